import { SectionLayout } from '@/components/layouts/section-layout';
import { canOnEvery, useAppAbility } from '@/lib/ability';

/** Bookings: the calendar, one's own bookings, and (for the brewer on duty and the admin) everyone's. */
const BookingsLayout = () => {
  const ability = useAppAbility();
  return (
    <SectionLayout
      title="Bookings"
      intro="Pick a free slot on the calendar to book it. Each booking keeps the item free afterwards for cleaning."
      tabs={[
        { to: '/bookings', end: true, label: 'Calendar' },
        { to: '/bookings/mine', label: 'My bookings', show: ability.can('create', 'Booking') },
        { to: '/bookings/all', label: 'All bookings', show: canOnEvery(ability, 'readOwner', 'Booking') },
      ]}
    />
  );
};

export default BookingsLayout;
