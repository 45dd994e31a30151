import { NavLink, Outlet } from 'react-router-dom';
import { Forbidden } from '@/components/errors/forbidden';
import { ButtonLink } from '@/components/ui/button';
import { cellarPaths } from '@/config/cellar-paths';
import { useAppAbility } from '@/lib/ability';
import { cn } from '@/utils/cn';

const tabClass = ({ isActive }: { isActive: boolean }) =>
  cn(
    '-mb-px inline-flex min-h-12 md:min-h-12 pointer-coarse:min-h-12 items-center border-b-2 px-3 text-sm font-medium no-underline hover:no-underline',
    isActive ? 'border-copper text-ink' : 'border-transparent text-ink-muted hover:border-line-strong hover:text-ink',
  );

/** Sanitation: where every vessel stands, the log of cycles, and the audit report. */
const SanitationLayout = () => {
  const ability = useAppAbility();
  if (!ability.can('read', 'SanitationCycle')) return <Forbidden what="Sanitation" />;
  return (
    <div className="flex flex-col gap-4">
      <header className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h1 className="text-2xl">Sanitation</h1>
          <p className="mt-1 text-ink-muted">Clean, rinse, sanitize, purge: the record that every vessel was ready before it touched beer.</p>
        </div>
        {ability.can('create', 'SanitationCycle') ? (
          <ButtonLink to={cellarPaths.recordCycle()} variant="primary" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12 px-5 text-base md:min-h-12">
            Record a cycle
          </ButtonLink>
        ) : null}
      </header>
      <nav aria-label="Sanitation sections" className="flex flex-wrap gap-x-1 border-b border-line">
        <NavLink to={cellarPaths.sanitation} end className={tabClass}>
          Vessels
        </NavLink>
        <NavLink to={cellarPaths.sanitationLog} className={tabClass}>
          Log
        </NavLink>
        {ability.can('read', 'SanitationAudit') ? (
          <NavLink to={cellarPaths.sanitationAudit} className={tabClass}>
            Audit report
          </NavLink>
        ) : null}
      </nav>
      <Outlet />
    </div>
  );
};

export default SanitationLayout;
