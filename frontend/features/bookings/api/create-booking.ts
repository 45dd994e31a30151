import type { Booking, CreateBookingInput } from '../../../../shared/schemas/booking.ts';
import { bookingKeys } from '@/features/bookings/api/keys';
import { api } from '@/lib/api-client';
import { useApiMutation } from '@/lib/api-mutation';
import { equipmentKeys } from '@/features/equipment/api/keys';

export { createBookingSchema } from '../../../../shared/schemas/booking.ts';

export const createBooking = (input: CreateBookingInput) => api.post<{ booking: Booking }>('/api/bookings', input);

export const useCreateBooking = () => useApiMutation(createBooking, [bookingKeys.all, equipmentKeys.all]);
