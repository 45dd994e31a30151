import { Forbidden } from '@/components/errors/forbidden';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { Outbox } from '@/features/mailbox/components/outbox';
import { useAppAbility } from '@/lib/ability';

const OutboxRoute = () => {
  useDocumentTitle('Outbox');
  const ability = useAppAbility();
  if (!ability.can('read', 'Mailbox')) return <Forbidden what="The outbox" />;
  return <Outbox />;
};

export default OutboxRoute;
