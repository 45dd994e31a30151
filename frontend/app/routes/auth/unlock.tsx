import { EmailLinkPage } from '@/components/layouts/email-link-page';
import { UnlockAccountForm } from '@/features/auth/components/unlock-account-form';

const UnlockRoute = () => (
  <EmailLinkPage
    title="Unlock your account"
    intro="Sign-in to your account was locked after many failed attempts. Unlock it to sign in again."
    incomplete="Open the link from the e-mail again."
  >
    {(token) => <UnlockAccountForm token={token} />}
  </EmailLinkPage>
);

export default UnlockRoute;
