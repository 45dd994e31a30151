import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { Booking, CreateBookingInput } from '../../../../shared/schemas/booking.ts';
import { bookingKeys } from '@/features/bookings/api/keys';
import { api } from '@/lib/api-client';
import { equipmentKeys } from '@/features/equipment/api/keys';

export { createBookingSchema } from '../../../../shared/schemas/booking.ts';

export const createBooking = (input: CreateBookingInput) => api.post<{ booking: Booking }>('/api/bookings', input);

export function useCreateBooking() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createBooking,
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: bookingKeys.all });
      await queryClient.invalidateQueries({ queryKey: equipmentKeys.all });
    },
  });
}
