import { Link } from 'react-router-dom';
import { StatusPage } from '@/components/layouts/status-page';
import { buttonClasses } from '@/components/ui/button';
import { paths } from '@/config/paths';

/** What a signed-in person who is not a site admin sees on an admin page (the server refuses them anyway). */
export function AdminOnly() {
  return (
    <StatusPage
      code="403"
      title="This page is for site admins"
      actions={
        <Link to={paths.home.getHref()} className={buttonClasses('primary')}>
          Back to projects
        </Link>
      }
    >
      <title>Admins only · Phasewright</title>
      Accounts, invitations and the security log are looked after by the people who run this Phasewright site.
    </StatusPage>
  );
}
