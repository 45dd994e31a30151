import { bookingKeys } from '@/features/bookings/api/keys';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';
import { equipmentKeys } from '@/features/equipment/api/keys';

export const cancelBooking = (id: string) => api.delete<void>(`/api/bookings/${encodeURIComponent(id)}`);

export const useCancelBooking = () => useApiMutation(cancelBooking, [bookingKeys.all, equipmentKeys.all]);
