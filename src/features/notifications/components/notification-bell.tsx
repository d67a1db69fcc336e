import { useEffect, useId, useRef, useState } from 'react';
import { Link } from 'react-router-dom';
import type { Notification } from '@shared/schemas/review';
import { paths } from '@/config/paths';
import { formatRelative } from '@/lib/format';
import { useMarkNotificationRead, useNotifications } from '@/features/notifications/api/notifications';

function notificationHref(n: Notification): string {
  if (n.runId == null) return paths.projects.detail.getHref(n.projectId);
  const run = paths.projects.run.getHref(n.projectId, n.runId);
  return n.threadId != null ? `${run}?thread=${n.threadId}` : run;
}

/** The bell in the app shell: unread count, and the newest notifications, each linking to what it is about. */
export function NotificationBell() {
  const notifications = useNotifications();
  const markRead = useMarkNotificationRead();
  const [open, setOpen] = useState(false);
  const panelId = useId();
  const rootRef = useRef<HTMLDivElement>(null);
  const unread = notifications.data?.unread ?? 0;

  useEffect(() => {
    if (!open) return;
    const onDown = (event: MouseEvent) => {
      if (!rootRef.current?.contains(event.target as Node)) setOpen(false);
    };
    const onKey = (event: KeyboardEvent) => {
      if (event.key === 'Escape') setOpen(false);
    };
    document.addEventListener('mousedown', onDown);
    document.addEventListener('keydown', onKey);
    return () => {
      document.removeEventListener('mousedown', onDown);
      document.removeEventListener('keydown', onKey);
    };
  }, [open]);

  return (
    <div ref={rootRef} className="relative">
      <button
        type="button"
        aria-expanded={open}
        aria-controls={panelId}
        aria-label={unread ? `Notifications, ${unread} unread` : 'Notifications'}
        onClick={() => setOpen((v) => !v)}
        className="relative rounded-full p-2 text-card hover:bg-white/10"
      >
        <svg aria-hidden="true" viewBox="0 0 24 24" className="size-5" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" strokeLinejoin="round">
          <path d="M6 8a6 6 0 1 1 12 0c0 7 3 9 3 9H3s3-2 3-9" />
          <path d="M10.3 21a1.94 1.94 0 0 0 3.4 0" />
        </svg>
        {unread ? (
          <span data-testid="unread-badge" className="absolute -top-0.5 -right-0.5 min-w-5 rounded-full bg-ember px-1 text-center text-xs font-extrabold text-ink">
            {unread > 99 ? '99+' : unread}
          </span>
        ) : null}
      </button>
      {open ? (
        <div id={panelId} className="absolute top-full left-0 z-50 mt-2 w-80 max-w-[90vw] rounded-xl bg-card p-3 text-ink shadow-xl ring-1 ring-line">
          <div className="mb-2 flex items-center justify-between gap-2">
            <h2 className="font-extrabold">Notifications</h2>
            {unread ? (
              <button type="button" className="text-sm font-bold text-teal hover:underline" onClick={() => markRead.mutate('all')}>
                Mark all read
              </button>
            ) : null}
          </div>
          {notifications.isPending ? (
            <p className="text-sm text-ink-soft">Loading…</p>
          ) : notifications.isError ? (
            <p className="text-sm text-ink-soft">Notifications could not be loaded.</p>
          ) : notifications.data.notifications.length === 0 ? (
            <p className="text-sm text-ink-soft">Nothing new. Mentions, replies and your finished runs show up here.</p>
          ) : (
            <ul className="flex max-h-96 flex-col divide-y divide-line overflow-y-auto">
              {notifications.data.notifications.map((n) => (
                <li key={n.id}>
                  <Link
                    to={notificationHref(n)}
                    onClick={() => {
                      setOpen(false);
                      if (!n.readAt) markRead.mutate(n.id);
                    }}
                    className={`block rounded px-1 py-2 text-sm hover:bg-paper-deep ${n.readAt ? 'text-ink-soft' : 'font-bold'}`}
                  >
                    {n.text}
                    <span className="block text-xs font-normal text-ink-soft">
                      {n.projectName} · {formatRelative(n.createdAt)}
                    </span>
                  </Link>
                </li>
              ))}
            </ul>
          )}
        </div>
      ) : null}
    </div>
  );
}
