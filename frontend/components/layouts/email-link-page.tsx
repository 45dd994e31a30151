import type { ReactNode } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { AuthLayout } from '@/components/layouts/auth-layout';
import { Alert } from '@/components/ui/alert';
import { paths } from '@/config/paths';

export interface EmailLinkPageProps {
  title: string;
  /** The line under the title, shown with the form. */
  intro: string;
  /** What to do when the link came without its token. */
  incomplete: ReactNode;
  /** The form, given the link's token. */
  children: (token: string) => ReactNode;
}

/** A signed-out page opened from a link in an e-mail (`?token=`): its form, or word that the link is incomplete; a way back to sign in. */
export const EmailLinkPage = ({ title, intro, incomplete, children }: EmailLinkPageProps) => {
  const [searchParams] = useSearchParams();
  const token = searchParams.get('token')?.trim() ?? '';
  return (
    <AuthLayout title={title} intro={token ? intro : undefined} footer={<Link to={paths.login}>Back to sign in</Link>}>
      {token ? (
        children(token)
      ) : (
        <Alert tone="error" title="This link is incomplete">
          {incomplete}
        </Alert>
      )}
    </AuthLayout>
  );
};
