import { Link, useLocation } from 'react-router-dom';
import { buttonClasses } from '@/components/ui/button';
import { paths } from '@/config/paths';
import { useDocumentTitle } from '@/hooks/use-document-title';

const NotFoundRoute = () => {
  useDocumentTitle('Not found');
  const location = useLocation();
  return (
    <section className="max-w-xl">
      <p className="text-sm font-medium text-ink-muted">Error 404</p>
      <h1 className="mt-1 text-2xl">Nothing at this address</h1>
      <p className="mt-2 text-ink-muted">
        <code className="rounded-sm bg-ground-deep px-1 py-0.5 text-ink">{location.pathname}</code> is not a page here. It may be a screen that is not built
        yet, or a link with a typo.
      </p>
      <Link to={paths.today} className={buttonClasses('primary', 'md', 'mt-6')}>
        Go to Today
      </Link>
    </section>
  );
};

export default NotFoundRoute;
