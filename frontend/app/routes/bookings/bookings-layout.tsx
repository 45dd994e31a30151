import { NavLink, Outlet } from 'react-router-dom';
import { canOnEvery, useAppAbility } from '@/lib/ability';
import { cn } from '@/utils/cn';

const tabClass = ({ isActive }: { isActive: boolean }) =>
  cn(
    '-mb-px inline-flex min-h-11 items-center border-b-2 px-3 text-sm font-medium no-underline hover:no-underline md:min-h-9 pointer-coarse:min-h-11',
    isActive ? 'border-copper text-ink' : 'border-transparent text-ink-muted hover:border-line-strong hover:text-ink',
  );

/** Bookings: the calendar, one's own bookings, and (for the brewer on duty and the admin) everyone's. */
const BookingsLayout = () => {
  const ability = useAppAbility();
  return (
    <div className="flex flex-col gap-4">
      <header>
        <h1 className="text-2xl">Bookings</h1>
        <p className="mt-1 text-ink-muted">Pick a free slot on the calendar to book it. Each booking keeps the item free afterwards for cleaning.</p>
      </header>
      <nav aria-label="Bookings sections" className="flex flex-wrap gap-x-1 border-b border-line">
        <NavLink to="/bookings" end className={tabClass}>
          Calendar
        </NavLink>
        {ability.can('create', 'Booking') ? (
          <NavLink to="/bookings/mine" className={tabClass}>
            My bookings
          </NavLink>
        ) : null}
        {canOnEvery(ability, 'readOwner', 'Booking') ? (
          <NavLink to="/bookings/all" className={tabClass}>
            All bookings
          </NavLink>
        ) : null}
      </nav>
      <Outlet />
    </div>
  );
};

export default BookingsLayout;
