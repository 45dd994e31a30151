import { isRouteErrorResponse, Link, useRouteError } from 'react-router-dom';
import { Brand } from '@/components/brand';
import { Button, buttonClasses } from '@/components/ui/button';
import { paths } from '@/config/paths';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { isApiProblem, networkProblemStatus } from '@/lib/api-client';

function isChunkLoadError(error: unknown): boolean {
  return error instanceof Error && /dynamically imported module|Importing a module script failed|error loading dynamically/i.test(error.message);
}

function describe(error: unknown): { title: string; text: string; status?: number } {
  if (isRouteErrorResponse(error)) {
    if (error.status === 404) return { title: 'Page not found', text: "There's nothing at this address.", status: 404 };
    return { title: error.statusText || 'Something went wrong', text: String(error.data ?? ''), status: error.status };
  }
  if (isChunkLoadError(error)) {
    return {
      title: 'Cellarwright has been updated',
      text: 'A part of the app could not be loaded, most likely because a newer version was just installed. Reload the page to carry on.',
    };
  }
  if (isApiProblem(error)) {
    if (error.status === networkProblemStatus) {
      return { title: "Can't reach the server", text: 'Check your connection, then try again.' };
    }
    if (error.status === 403) {
      return { title: 'Not for your role', text: error.detail ?? 'Your roles do not include this page.', status: 403 };
    }
    if (error.status === 404) {
      return { title: 'Not found', text: error.detail ?? 'It may have been removed, or it is not visible to you.', status: 404 };
    }
    return {
      title: 'The server had a problem',
      text: error.detail ?? `${error.title} (${error.status}). Try again in a moment.`,
      status: error.status,
    };
  }
  return {
    title: 'Something went wrong',
    text: 'An unexpected error stopped this page. Try again; if it keeps happening, tell the co-op admin what you were doing.',
  };
}

export interface ErrorPageProps {
  /** Inside the app frame (navigation stays); otherwise a whole page with the brand. */
  inFrame?: boolean;
}

export const ErrorPage = ({ inFrame = false }: ErrorPageProps) => {
  const error = useRouteError();
  const { title, text, status } = describe(error);
  useDocumentTitle(title);
  if (import.meta.env.DEV) console.error(error);

  const body = (
    <section className="max-w-xl" aria-labelledby="error-title">
      {status ? <p className="text-sm font-medium text-ink-muted">Error {status}</p> : null}
      <h1 id="error-title" className="mt-1 text-2xl">
        {title}
      </h1>
      {text ? <p className="mt-2 text-ink-muted">{text}</p> : null}
      {import.meta.env.DEV && error instanceof Error ? (
        <pre className="mt-4 overflow-auto rounded-md border border-line bg-surface p-3 text-xs text-ink-muted">{error.stack ?? error.message}</pre>
      ) : null}
      <div className="mt-6 flex flex-wrap gap-2">
        <Button onClick={() => window.location.reload()}>Reload</Button>
        <Link to={paths.today} className={buttonClasses('secondary')}>
          Go to Today
        </Link>
      </div>
    </section>
  );

  if (inFrame) return body;
  return (
    <div className="flex min-h-dvh flex-col gap-10 px-4 py-8 sm:px-10">
      <Brand />
      {body}
    </div>
  );
};
