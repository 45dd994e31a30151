import { Forbidden } from '@/components/errors/forbidden';
import { BookingsList } from '@/features/bookings/components/bookings-list';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { canOnEvery, useAppAbility } from '@/lib/ability';

const AllBookingsRoute = () => {
  useDocumentTitle('All bookings');
  const ability = useAppAbility();
  if (!canOnEvery(ability, 'readOwner', 'Booking')) return <Forbidden what="Everyone's bookings" />;
  return <BookingsList mine={false} />;
};

export default AllBookingsRoute;
