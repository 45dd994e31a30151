import { Forbidden } from '@/components/errors/forbidden';
import { SectionLayout } from '@/components/layouts/section-layout';
import { paths } from '@/config/paths';
import { canOnEvery, useAppAbility } from '@/lib/ability';
import { useDevMailboxAvailable } from '@/lib/dev-mailbox';

/** Members and (in development) the Outbox, for the admin. */
const MembersLayout = () => {
  const ability = useAppAbility();
  const mailbox = useDevMailboxAvailable();
  if (!canOnEvery(ability, 'update', 'User')) return <Forbidden what="Members" />;
  return (
    <SectionLayout
      title="Members"
      intro="Everyone with an account, their roles, and invitations."
      tabs={[
        { to: paths.members, end: true, label: 'People', show: mailbox },
        { to: paths.outbox, label: 'Outbox', show: mailbox },
      ]}
    />
  );
};

export default MembersLayout;
