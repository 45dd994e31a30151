import { Link } from 'react-router-dom';
import { buttonClasses } from '@/components/ui/button';
import { paths } from '@/config/paths';
import { useDocumentTitle } from '@/hooks/use-document-title';

/** Shown in place of a screen the person's roles do not include. */
export const Forbidden = ({ what = 'This page' }: { what?: string }) => {
  useDocumentTitle('Not for your role');
  return (
    <section className="max-w-xl">
      <h1 className="text-2xl">Not for your role</h1>
      <p className="mt-2 text-ink-muted">{what} is for the co-op's admin. If you need it, ask an admin to add the role to your account.</p>
      <Link to={paths.today} className={buttonClasses('secondary', 'md', 'mt-6')}>
        Go to Today
      </Link>
    </section>
  );
};
