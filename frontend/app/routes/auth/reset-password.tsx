import { Link } from 'react-router-dom';
import { EmailLinkPage } from '@/components/layouts/email-link-page';
import { paths } from '@/config/paths';
import { ResetPasswordForm } from '@/features/auth/components/reset-password-form';

const incomplete = (
  <>
    Open the link from the e-mail again, or <Link to={paths.forgotPassword}>ask for a new one</Link>.
  </>
);

const ResetPasswordRoute = () => (
  <EmailLinkPage title="Choose a new password" intro="Pick something you have not used here before." incomplete={incomplete}>
    {(token) => <ResetPasswordForm token={token} />}
  </EmailLinkPage>
);

export default ResetPasswordRoute;
