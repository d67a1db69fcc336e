import { NOTIFICATION_KINDS, NOTIFICATION_KIND_LABELS, type NotificationKind } from '@shared/schemas/review';
import { Banner } from '@/components/ui/banner';
import { Card } from '@/components/ui/card';
import { Spinner } from '@/components/ui/spinner';
import { useNotificationPreferences, useUpdateNotificationPreferences } from '@/features/notifications/api/notification-preferences';

const SHORT_LABELS: Record<NotificationKind, string> = {
  mention: 'Mentions',
  reply: 'Replies in my threads',
  'run-finished': 'My runs finishing',
};

/** Which kinds of notification also arrive by e-mail; each box saves as soon as it changes. */
export function EmailPreferencesCard() {
  const preferences = useNotificationPreferences();
  const update = useUpdateNotificationPreferences();
  const current = preferences.data;

  return (
    <Card
      title="E-mail notifications"
      description="Everything still shows under the bell in the app. Choose what also reaches your inbox."
    >
      {preferences.isPending ? (
        <Spinner />
      ) : preferences.isError || !current ? (
        <Banner title="Your e-mail choices did not load">{preferences.error?.message}</Banner>
      ) : (
        <fieldset className="flex flex-col gap-3" disabled={update.isPending}>
          <legend className="sr-only">Send me an e-mail when</legend>
          {NOTIFICATION_KINDS.map((kind) => (
            <label key={kind} className="flex items-start gap-3">
              <input
                type="checkbox"
                className="mt-1 size-4 accent-teal"
                checked={current.email[kind]}
                onChange={(event) => update.mutate({ email: { ...current.email, [kind]: event.target.checked } })}
              />
              <span>
                <span className="block font-bold">{SHORT_LABELS[kind]}</span>
                <span className="block text-sm text-ink-soft">{NOTIFICATION_KIND_LABELS[kind]}</span>
              </span>
            </label>
          ))}
          {update.isError ? <p className="text-sm font-semibold text-danger">Not saved: {update.error.message}</p> : null}
        </fieldset>
      )}
    </Card>
  );
}
