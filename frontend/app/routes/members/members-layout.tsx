import { NavLink, Outlet } from 'react-router-dom';
import { Forbidden } from '@/components/errors/forbidden';
import { paths } from '@/config/paths';
import { canOnEvery, useAppAbility } from '@/lib/ability';
import { useDevMailboxAvailable } from '@/lib/dev-mailbox';
import { cn } from '@/utils/cn';

const tabClass = ({ isActive }: { isActive: boolean }) =>
  cn(
    '-mb-px inline-flex min-h-11 items-center border-b-2 px-3 text-sm font-medium no-underline hover:no-underline md:min-h-9 pointer-coarse:min-h-11',
    isActive ? 'border-copper text-ink' : 'border-transparent text-ink-muted hover:border-line-strong hover:text-ink',
  );

/** Members and (in development) the Outbox, for the admin. */
const MembersLayout = () => {
  const ability = useAppAbility();
  const mailbox = useDevMailboxAvailable();
  if (!canOnEvery(ability, 'update', 'User')) return <Forbidden what="Members" />;
  return (
    <div className="flex flex-col gap-4">
      <header>
        <h1 className="text-2xl">Members</h1>
        <p className="mt-1 text-ink-muted">Everyone with an account, their roles, and invitations.</p>
      </header>
      {mailbox ? (
        <nav aria-label="Members sections" className="flex flex-wrap gap-x-1 border-b border-line">
          <NavLink to={paths.members} end className={tabClass}>
            People
          </NavLink>
          <NavLink to={paths.outbox} className={tabClass}>
            Outbox
          </NavLink>
        </nav>
      ) : null}
      <Outlet />
    </div>
  );
};

export default MembersLayout;
