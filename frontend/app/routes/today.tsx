import { Link } from 'react-router-dom';
import { roleLabels, roles as roleOrder, type Role } from '../../../shared/permissions/roles.ts';
import { RoleBadges } from '@/components/role-badges';
import { coopName } from '@/config/app';
import { paths } from '@/config/paths';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { canOnEvery, useAppAbility } from '@/lib/ability';
import { useSessionUser } from '@/lib/auth';
import { greetingFor } from '@/utils/format';

/** What each role looks at first, in the co-op's own words. */
const focus: Record<Role, string> = {
  member:
    'Your fermenter and keg bookings, the batches you have going and their latest readings, and whatever is left to pay.',
  brewer_on_duty:
    'The cellar round: vessels that need cleaning before their next booking, transfers due from fermenter to keg, and kegs overdue back from members.',
  treasurer: 'Unpaid invoices and how old they are, payments that came in, and the month’s invoice run.',
  admin: 'Who is waiting on an invitation, whether everyone has the roles they need, and the equipment registry.',
};

const TodayRoute = () => {
  useDocumentTitle('Today');
  const user = useSessionUser();
  const ability = useAppAbility();
  if (!user) return null;
  const held = roleOrder.filter((role) => user.roles.includes(role));

  return (
    <div className="flex max-w-3xl flex-col gap-6">
      <header className="flex flex-col gap-2">
        <p className="text-sm text-ink-muted">{coopName}</p>
        <h1 className="text-2xl">
          {greetingFor()}, {user.name}
        </h1>
        <RoleBadges roles={user.roles} />
      </header>

      <section aria-labelledby="today-focus" className="flex flex-col gap-3">
        <h2 id="today-focus" className="text-base">
          What to look at today
        </h2>
        {held.length === 0 ? (
          <p className="text-ink-muted">
            Your account has no role yet, so there is nothing for you here. Ask the co-op admin to add one.
          </p>
        ) : (
          <ul className="grid gap-3 sm:grid-cols-2">
            {held.map((role) => (
              <li key={role} className="rounded-md border border-line bg-surface p-4">
                <p className="text-xs font-semibold tracking-wide text-ink-muted uppercase">As {roleLabels[role]}</p>
                <p className="mt-1.5 text-ink">{focus[role]}</p>
                {role === 'admin' && canOnEvery(ability, 'update', 'User') ? (
                  <p className="mt-2">
                    <Link to={paths.members}>Open Members</Link>
                  </p>
                ) : null}
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
};

export default TodayRoute;
