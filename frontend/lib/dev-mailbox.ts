import { useQuery } from '@tanstack/react-query';
import { api, isApiProblem } from '@/lib/api-client';
import { useAppAbility } from '@/lib/ability';
import { mailboxKeys } from '@/features/mailbox/api/keys';

/**
 * Whether this server has the development mailbox (it answers 404 outside development mode).
 * The app frame uses it to leave the Outbox out of the navigation in production.
 */
export function useDevMailboxAvailable(): boolean {
  const ability = useAppAbility();
  const allowed = ability.can('read', 'Mailbox');
  const probe = useQuery({
    queryKey: mailboxKeys.probe(),
    queryFn: async ({ signal }) => {
      try {
        await api.get('/api/dev/mailbox', { query: { page: 1, pageSize: 1 }, signal });
        return true;
      } catch (error) {
        if (isApiProblem(error) && error.status === 404) return false;
        throw error;
      }
    },
    enabled: allowed,
    staleTime: Number.POSITIVE_INFINITY,
    retry: false,
  });
  // Until it answers (or if it fails for another reason) keep the entry: the page explains itself.
  return allowed && probe.data !== false;
}
