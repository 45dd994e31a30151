import { useCallback, useState, type FormEvent } from 'react';
import { problemMessage } from '@/lib/api-client';

/** What an action does: returns a message in words to refuse before sending, or nothing once done. */
export type ErrorAction = () => Promise<string | undefined | void> | string | undefined | void;

/**
 * For a form or a confirmation that keeps its own few values rather than a schema form: `run(action)`
 * clears the error, runs the action, and shows what went wrong in words (a refusal the action returns,
 * or the request's problem). `onSubmit(action)` is the same for a form's submit event.
 */
export function useActionError() {
  const [error, setError] = useState<string | null>(null);
  const run = useCallback(async (action: ErrorAction) => {
    setError(null);
    try {
      const refusal = await action();
      if (refusal) setError(refusal);
    } catch (e) {
      setError(problemMessage(e));
    }
  }, []);
  const onSubmit = useCallback(
    (action: ErrorAction) => (event: FormEvent) => {
      event.preventDefault();
      void run(action);
    },
    [run],
  );
  return { error, setError, run, onSubmit };
}
