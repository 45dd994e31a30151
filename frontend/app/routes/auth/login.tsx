import { useNavigate, useSearchParams } from 'react-router-dom';
import { AuthLayout } from '@/components/layouts/auth-layout';
import { paths } from '@/config/paths';
import { LoginForm } from '@/features/auth/components/login-form';
import { safeNextPath } from '@/lib/auth';

const LoginRoute = () => {
  const navigate = useNavigate();
  const [searchParams] = useSearchParams();
  const next = safeNextPath(searchParams.get('next'));
  return (
    <AuthLayout title="Sign in" intro={next ? 'Sign in to carry on where you were.' : 'Welcome back to the cellar.'}>
      <LoginForm onSignedIn={() => navigate(next ?? paths.today, { replace: true })} />
    </AuthLayout>
  );
};

export default LoginRoute;
