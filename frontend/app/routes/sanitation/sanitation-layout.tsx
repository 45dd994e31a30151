import { Forbidden } from '@/components/errors/forbidden';
import { SectionLayout } from '@/components/layouts/section-layout';
import { ButtonLink } from '@/components/ui/button';
import { cellarPaths } from '@/config/cellar-paths';
import { useAppAbility } from '@/lib/ability';

/** Sanitation: where every vessel stands, the log of cycles, and the audit report. */
const SanitationLayout = () => {
  const ability = useAppAbility();
  if (!ability.can('read', 'SanitationCycle')) return <Forbidden what="Sanitation" />;
  return (
    <SectionLayout
      title="Sanitation"
      intro="Clean, rinse, sanitize, purge: the record that every vessel was ready before it touched beer."
      action={
        ability.can('create', 'SanitationCycle') ? (
          <ButtonLink to={cellarPaths.recordCycle()} variant="primary" className="min-h-12 md:min-h-12 pointer-coarse:min-h-12 px-5 text-base">
            Record a cycle
          </ButtonLink>
        ) : null
      }
      tabs={[
        { to: cellarPaths.sanitation, end: true, label: 'Vessels' },
        { to: cellarPaths.sanitationLog, label: 'Log' },
        { to: cellarPaths.sanitationAudit, label: 'Audit report', show: ability.can('read', 'SanitationAudit') },
      ]}
    />
  );
};

export default SanitationLayout;
