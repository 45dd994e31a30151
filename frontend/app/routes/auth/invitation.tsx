import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { AuthLayout } from '@/components/layouts/auth-layout';
import { Alert } from '@/components/ui/alert';
import { PageLoader } from '@/components/ui/spinner';
import { coopName } from '@/config/app';
import { paths } from '@/config/paths';
import { useInvitation } from '@/features/auth/api/get-invitation';
import { AcceptInvitationForm } from '@/features/auth/components/accept-invitation-form';
import { isApiProblem, problemMessage } from '@/lib/api-client';
import { useSessionUser } from '@/lib/auth';

function invitationError(error: unknown): { title: string; text: string } {
  if (isApiProblem(error) && error.status === 410) {
    return { title: 'This invitation has expired', text: 'It was used already or is too old. Ask the co-op admin to send a new one.' };
  }
  if (isApiProblem(error) && error.status === 404) {
    return { title: 'We could not find this invitation', text: 'Check that the whole link was opened, or ask the co-op admin for a new one.' };
  }
  return { title: 'The invitation could not be loaded', text: problemMessage(error) };
}

const InvitationRoute = () => {
  const navigate = useNavigate();
  const [searchParams] = useSearchParams();
  const token = searchParams.get('token')?.trim() ?? '';
  const invitation = useInvitation(token);
  const signedIn = useSessionUser();

  let body;
  if (!token) {
    body = (
      <Alert tone="error" title="This link is incomplete">
        Open the link from the invitation e-mail again.
      </Alert>
    );
  } else if (invitation.isPending) {
    body = <PageLoader label="Opening your invitation…" />;
  } else if (invitation.isError) {
    const { title, text } = invitationError(invitation.error);
    body = (
      <Alert tone="error" title={title}>
        {text}
      </Alert>
    );
  } else {
    body = (
      <div className="flex flex-col gap-4">
        {signedIn && signedIn.email !== invitation.data.email ? (
          <Alert>
            You are signed in as {signedIn.name}. Accepting signs you in as {invitation.data.email} instead.
          </Alert>
        ) : null}
        <AcceptInvitationForm token={token} invitation={invitation.data} onAccepted={() => navigate(paths.today, { replace: true })} />
      </div>
    );
  }

  return (
    <AuthLayout
      title="Join the co-op's cellar"
      intro={`You've been invited to ${coopName}'s back office. Choose your name and a password.`}
      footer={
        <>
          Already have an account? <Link to={paths.login}>Sign in</Link>
        </>
      }
    >
      {body}
    </AuthLayout>
  );
};

export default InvitationRoute;
