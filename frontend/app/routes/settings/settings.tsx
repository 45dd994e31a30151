import { Link } from 'react-router-dom';
import { Forbidden } from '@/components/errors/forbidden';
import { paths } from '@/config/paths';
import { sectionDescription, sectionTitle, settingsScreenSections } from '@/features/settings/sections';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useAppAbility } from '@/lib/ability';

/** Settings: the co-op's rules, one section per capability; the admin edits, the rota and treasurer read. */
const SettingsRoute = () => {
  useDocumentTitle('Settings');
  const ability = useAppAbility();
  if (!ability.can('read', 'Setting')) return <Forbidden what="Settings" />;
  const canEdit = ability.can('update', 'Setting');
  return (
    <div className="flex flex-col gap-5">
      <header>
        <h1 className="text-2xl">Settings</h1>
        <p className="mt-1 text-ink-muted">
          The co-op’s rules. Changes apply from the moment they are saved and are kept in the{' '}
          {ability.can('read', 'AuditLog') ? <Link to={paths.audit}>audit trail</Link> : 'audit trail'}.
        </p>
      </header>
      {settingsScreenSections.map(({ key, Component }) => (
        <section key={key} id={key} aria-labelledby={`${key}-title`} className="rounded-lg border border-line bg-surface p-4">
          <h2 id={`${key}-title`} className="text-base">
            {sectionTitle(key)}
          </h2>
          <p className="mt-1 mb-4 text-sm text-ink-muted">{sectionDescription(key)}</p>
          <Component canEdit={canEdit} />
        </section>
      ))}
    </div>
  );
};

export default SettingsRoute;
