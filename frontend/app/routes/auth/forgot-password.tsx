import { Link } from 'react-router-dom';
import { AuthLayout } from '@/components/layouts/auth-layout';
import { paths } from '@/config/paths';
import { ForgotPasswordForm } from '@/features/auth/components/forgot-password-form';

const ForgotPasswordRoute = () => (
  <AuthLayout
    title="Forgot your password?"
    intro="Type the e-mail you sign in with and we'll send a link to choose a new password."
    footer={<Link to={paths.login}>Back to sign in</Link>}
  >
    <ForgotPasswordForm />
  </AuthLayout>
);

export default ForgotPasswordRoute;
