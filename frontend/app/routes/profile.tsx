import { RoleBadges } from '@/components/role-badges';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { ProfileForm } from '@/features/auth/components/profile-form';
import { CalendarFeedPanel } from '@/features/calendar/calendar-feed-panel';
import { useSessionUser } from '@/lib/auth';

const ProfileRoute = () => {
  useDocumentTitle('Profile');
  const user = useSessionUser();
  if (!user) return null;
  return (
    <div className="flex max-w-2xl flex-col gap-6">
      <header>
        <h1 className="text-2xl">Profile</h1>
        <p className="mt-1 text-ink-muted">How you appear to the co-op, and how numbers are shown to you.</p>
      </header>
      <dl className="grid max-w-md grid-cols-[auto_1fr] items-center gap-x-4 gap-y-2 rounded-md border border-line bg-surface p-4">
        <dt className="text-sm text-ink-muted">E-mail</dt>
        <dd className="break-all">{user.email}</dd>
        <dt className="text-sm text-ink-muted">Roles</dt>
        <dd>
          <RoleBadges roles={user.roles} />
        </dd>
      </dl>
      <ProfileForm key={user.id} user={user} />
      <CalendarFeedPanel />
    </div>
  );
};

export default ProfileRoute;
