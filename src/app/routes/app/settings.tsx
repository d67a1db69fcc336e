import { PageHeader } from '@/components/layouts/page-header';
import { Card } from '@/components/ui/card';
import { useCurrentUser } from '@/features/auth/api/get-me';
import { ChangePasswordForm } from '@/features/auth/components/change-password-form';
import { ProfileForm } from '@/features/auth/components/profile-form';
import { EmailPreferencesCard } from '@/features/notifications/components/email-preferences-card';
import { AccessTokensCard } from '@/features/sharing/components/access-tokens-card';

export default function SettingsRoute() {
  const user = useCurrentUser();
  return (
    <>
      <title>Settings · Phasewright</title>
      <PageHeader title="Settings" description="How you appear to your teammates, and how you sign in." />
      <div className="grid max-w-3xl gap-6">
        <Card title="Profile">
          <ProfileForm key={user.id} user={user} />
        </Card>
        <Card title="Password" description="You stay signed in here after changing it.">
          <ChangePasswordForm />
        </Card>
        <EmailPreferencesCard />
        <AccessTokensCard />
      </div>
    </>
  );
}
