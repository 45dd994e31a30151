import { Forbidden } from '@/components/errors/forbidden';
import { SectionLayout } from '@/components/layouts/section-layout';
import { cellarPaths } from '@/config/cellar-paths';
import { canOnEvery, useAppAbility } from '@/lib/ability';

/** Kegs: where each one is, who owes one back, and what is on the taps. */
const KegsLayout = () => {
  const ability = useAppAbility();
  if (!ability.can('read', 'Keg')) return <Forbidden what="Kegs" />;
  const everyone = canOnEvery(ability, 'read', 'Keg');
  return (
    <SectionLayout
      title="Kegs"
      intro={
        everyone
          ? 'Where every keg is: the cellar, the cold room and its taps, out with a member, or missing.'
          : 'Your kegs: what is in them, where they are and when they are due back.'
      }
      tabs={[
        { to: cellarPaths.kegs, end: true, label: 'Whereabouts' },
        { to: cellarPaths.overdue, label: 'Overdue' },
        { to: cellarPaths.tapBoard, label: 'Tap board' },
      ]}
    />
  );
};

export default KegsLayout;
