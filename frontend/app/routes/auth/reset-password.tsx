import { Link, useSearchParams } from 'react-router-dom';
import { AuthLayout } from '@/components/layouts/auth-layout';
import { Alert } from '@/components/ui/alert';
import { paths } from '@/config/paths';
import { ResetPasswordForm } from '@/features/auth/components/reset-password-form';

const ResetPasswordRoute = () => {
  const [searchParams] = useSearchParams();
  const token = searchParams.get('token')?.trim() ?? '';
  return (
    <AuthLayout
      title="Choose a new password"
      intro={token ? 'Pick something you have not used here before.' : undefined}
      footer={<Link to={paths.login}>Back to sign in</Link>}
    >
      {token ? (
        <ResetPasswordForm token={token} />
      ) : (
        <Alert tone="error" title="This link is incomplete">
          Open the link from the e-mail again, or <Link to={paths.forgotPassword}>ask for a new one</Link>.
        </Alert>
      )}
    </AuthLayout>
  );
};

export default ResetPasswordRoute;
