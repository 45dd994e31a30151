import { BookingsList } from '@/features/bookings/components/bookings-list';
import { useDocumentTitle } from '@/hooks/use-document-title';

const MyBookingsRoute = () => {
  useDocumentTitle('My bookings');
  return <BookingsList mine />;
};

export default MyBookingsRoute;
