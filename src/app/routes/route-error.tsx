import { isRouteErrorResponse, Link, useRouteError } from 'react-router-dom';
import { StatusPage } from '@/components/layouts/status-page';
import { Button, buttonClasses } from '@/components/ui/button';
import { paths } from '@/config/paths';
import { isApiError } from '@/lib/api-client';

function describe(error: unknown): { code?: string; title: string; message: string } {
  if (isRouteErrorResponse(error) && error.status === 404) {
    return { code: '404', title: 'Nothing at this address', message: 'The page may have moved, or the link is mistyped.' };
  }
  if (isApiError(error)) {
    return {
      code: error.status ? String(error.status) : undefined,
      title: error.status === 0 ? 'The server is out of reach' : 'The server could not answer',
      message: error.message,
    };
  }
  if (error instanceof TypeError && /dynamically imported module|Importing a module script/i.test(error.message)) {
    return {
      title: 'A newer version is available',
      message: 'Phasewright was updated while this tab was open. Reload to continue.',
    };
  }
  return { title: 'Something went wrong', message: 'An unexpected error stopped this page. Reloading usually helps.' };
}

export function RouteErrorPage() {
  const error = useRouteError();
  const { code, title, message } = describe(error);
  return (
    <StatusPage
      fullScreen
      code={code}
      title={title}
      actions={
        <>
          <Button onClick={() => window.location.reload()}>Reload</Button>
          <Link to={paths.home.getHref()} className={buttonClasses('secondary')} reloadDocument>
            Go to projects
          </Link>
        </>
      }
    >
      {message}
    </StatusPage>
  );
}
