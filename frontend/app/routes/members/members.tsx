import { useDocumentTitle } from '@/hooks/use-document-title';
import { MembersDirectory } from '@/features/users/components/members-directory';
import { useSessionUser } from '@/lib/auth';

const MembersRoute = () => {
  useDocumentTitle('Members');
  const user = useSessionUser();
  if (!user) return null;
  return <MembersDirectory currentUserId={user.id} />;
};

export default MembersRoute;
