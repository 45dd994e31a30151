import { useMutation, useQueryClient } from '@tanstack/react-query';
import { bookingKeys } from '@/features/bookings/api/keys';
import { api } from '@/lib/api-client';
import { equipmentKeys } from '@/features/equipment/api/keys';

export const cancelBooking = (id: string) => api.delete<void>(`/api/bookings/${encodeURIComponent(id)}`);

export function useCancelBooking() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: cancelBooking,
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: bookingKeys.all });
      await queryClient.invalidateQueries({ queryKey: equipmentKeys.all });
    },
  });
}
