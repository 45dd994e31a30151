import { Link } from 'react-router-dom';
import { ProblemAlert } from '@/components/form/problem-alert';
import { Alert } from '@/components/ui/alert';
import { Button, buttonClasses } from '@/components/ui/button';
import { paths } from '@/config/paths';
import { useUnlockAccount } from '@/features/auth/api/unlock-account';
import { isApiProblem } from '@/lib/api-client';

export interface UnlockAccountFormProps {
  token: string;
}

const isDeadLink = (error: unknown) => isApiProblem(error) && (error.status === 410 || error.status === 404 || error.status === 422);

/** One button: the link alone does nothing, so a mail program that opens links ahead of time unlocks nothing. */
export const UnlockAccountForm = ({ token }: UnlockAccountFormProps) => {
  const unlock = useUnlockAccount();

  if (unlock.isSuccess) {
    return (
      <div className="flex flex-col gap-4">
        <Alert tone="success" title="Account unlocked">
          You can sign in again. If the failed attempts were not yours, choose a new password.
        </Alert>
        <Link to={paths.login} className={buttonClasses('primary', 'md', 'w-full')}>
          Sign in
        </Link>
        <Link to={paths.forgotPassword} className={buttonClasses('secondary', 'md', 'w-full')}>
          Choose a new password
        </Link>
      </div>
    );
  }

  if (unlock.isError && isDeadLink(unlock.error)) {
    return (
      <div className="flex flex-col gap-4">
        <Alert tone="error" title="This link no longer works">
          It has expired or has been used already. The lock ends by itself after a while; or choose a new password, which lifts it too.
        </Alert>
        <Link to={paths.forgotPassword} className={buttonClasses('primary', 'md', 'w-full')}>
          Choose a new password
        </Link>
      </div>
    );
  }

  return (
    <form
      onSubmit={(event) => {
        event.preventDefault();
        unlock.mutate({ token });
      }}
      className="flex flex-col gap-4"
    >
      <ProblemAlert error={unlock.error} />
      <Button type="submit" pending={unlock.isPending} className="w-full">
        Unlock my account
      </Button>
    </form>
  );
};
