import { Link, useSearchParams } from 'react-router-dom';
import { AuthLayout } from '@/components/layouts/auth-layout';
import { Alert } from '@/components/ui/alert';
import { paths } from '@/config/paths';
import { UnlockAccountForm } from '@/features/auth/components/unlock-account-form';

const UnlockRoute = () => {
  const [searchParams] = useSearchParams();
  const token = searchParams.get('token')?.trim() ?? '';
  return (
    <AuthLayout
      title="Unlock your account"
      intro={token ? 'Sign-in to your account was locked after many failed attempts. Unlock it to sign in again.' : undefined}
      footer={<Link to={paths.login}>Back to sign in</Link>}
    >
      {token ? (
        <UnlockAccountForm token={token} />
      ) : (
        <Alert tone="error" title="This link is incomplete">
          Open the link from the e-mail again.
        </Alert>
      )}
    </AuthLayout>
  );
};

export default UnlockRoute;
