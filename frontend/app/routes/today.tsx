import type { ReactNode } from 'react';
import { Link } from 'react-router-dom';
import { RoleBadges } from '@/components/role-badges';
import { Alert } from '@/components/ui/alert';
import { Spinner } from '@/components/ui/spinner';
import { coopName } from '@/config/app';
import { paths } from '@/config/paths';
import { useToday } from '@/features/today/api/get-today';
import { CellarToday, MemberToday, MoneyToday } from '@/features/today/components/today-sections';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { canOnEvery, useAppAbility } from '@/lib/ability';
import { useSessionUser } from '@/lib/auth';
import { greetingFor } from '@/utils/format';

/** One role's part of the day, under its heading. */
const Section = ({ id, title, content }: { id: string; title: string; content: ReactNode }) => (
  <section aria-labelledby={id} className="flex flex-col gap-3">
    <h2 id={id} className="text-base">
      {title}
    </h2>
    {content}
  </section>
);

/** What needs doing today, for each role the person holds. */
const TodayRoute = () => {
  useDocumentTitle('Today');
  const user = useSessionUser();
  const ability = useAppAbility();
  const today = useToday();
  if (!user) return null;

  return (
    <div className="flex max-w-5xl flex-col gap-6">
      <header className="flex flex-col gap-2">
        <p className="text-sm text-ink-muted">{coopName}</p>
        <h1 className="text-2xl">
          {greetingFor()}, {user.name}
        </h1>
        <RoleBadges roles={user.roles} />
      </header>

      {user.roles.length === 0 ? (
        <p className="text-ink-muted">Your account has no role yet, so there is nothing for you here. Ask the co-op admin to add one.</p>
      ) : null}
      {today.isPending ? <Spinner label="Loading today’s list" /> : null}
      {today.isError ? <Alert tone="error">Today’s list could not be loaded: {today.error.message}</Alert> : null}

      {today.data?.cellar ? <Section id="today-cellar" title="The cellar round" content={<CellarToday section={today.data.cellar} />} /> : null}
      {today.data?.money ? <Section id="today-money" title="The books" content={<MoneyToday section={today.data.money} />} /> : null}
      {today.data?.member ? <Section id="today-member" title="Your brewing" content={<MemberToday section={today.data.member} />} /> : null}
      {canOnEvery(ability, 'update', 'User') ? (
        <section aria-labelledby="today-admin" className="flex flex-col gap-2">
          <h2 id="today-admin" className="text-base">
            Running the co-op
          </h2>
          <p className="text-sm">
            <Link to={paths.members}>Members and roles</Link> · <Link to={paths.cellar}>Equipment registry</Link> ·{' '}
            <Link to={paths.settings}>Co-op settings</Link>
          </p>
        </section>
      ) : null}
    </div>
  );
};

export default TodayRoute;
