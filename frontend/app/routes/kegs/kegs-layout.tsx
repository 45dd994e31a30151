import { NavLink, Outlet } from 'react-router-dom';
import { Forbidden } from '@/components/errors/forbidden';
import { cellarPaths } from '@/config/cellar-paths';
import { canOnEvery, useAppAbility } from '@/lib/ability';
import { cn } from '@/utils/cn';

const tabClass = ({ isActive }: { isActive: boolean }) =>
  cn(
    '-mb-px inline-flex min-h-12 md:min-h-12 pointer-coarse:min-h-12 items-center border-b-2 px-3 text-sm font-medium whitespace-nowrap no-underline hover:no-underline',
    isActive ? 'border-copper text-ink' : 'border-transparent text-ink-muted hover:border-line-strong hover:text-ink',
  );

/** Kegs: where each one is, who owes one back, and what is on the taps. */
const KegsLayout = () => {
  const ability = useAppAbility();
  if (!ability.can('read', 'Keg')) return <Forbidden what="Kegs" />;
  const everyone = canOnEvery(ability, 'read', 'Keg');
  return (
    <div className="flex flex-col gap-4">
      <header>
        <h1 className="text-2xl">Kegs</h1>
        <p className="mt-1 text-ink-muted">
          {everyone
            ? 'Where every keg is: the cellar, the cold room and its taps, out with a member, or missing.'
            : 'Your kegs: what is in them, where they are and when they are due back.'}
        </p>
      </header>
      <nav aria-label="Kegs sections" className="flex flex-wrap gap-x-1 border-b border-line">
        <NavLink to={cellarPaths.kegs} end className={tabClass}>
          Whereabouts
        </NavLink>
        <NavLink to={cellarPaths.overdue} className={tabClass}>
          Overdue
        </NavLink>
        <NavLink to={cellarPaths.tapBoard} className={tabClass}>
          Tap board
        </NavLink>
      </nav>
      <Outlet />
    </div>
  );
};

export default KegsLayout;
