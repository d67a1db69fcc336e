import { Link } from 'react-router-dom';
import { StatusPage } from '@/components/layouts/status-page';
import { buttonClasses } from '@/components/ui/button';
import { paths } from '@/config/paths';

export default function NotFoundRoute() {
  return (
    <StatusPage
      fullScreen
      code="404"
      title="Nothing at this address"
      actions={
        <Link to={paths.home.getHref()} className={buttonClasses('primary')}>
          Go to projects
        </Link>
      }
    >
      <title>Not found · Phasewright</title>
      The page may have moved, or the link is mistyped. Your projects are one step away.
    </StatusPage>
  );
}
