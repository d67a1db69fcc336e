import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { Notification } from '@shared/schemas/review';
import { api } from '@/lib/api-client';

export const notificationKeys = {
  all: ['notifications'] as const,
  list: () => [...notificationKeys.all, 'list'] as const,
};

export function getNotifications(signal?: AbortSignal): Promise<{ notifications: Notification[]; unread: number }> {
  return api.get<{ notifications: Notification[]; unread: number }>('/notifications', { signal });
}

export function notificationsQueryOptions() {
  return queryOptions({ queryKey: notificationKeys.list(), queryFn: ({ signal }) => getNotifications(signal), refetchInterval: 30_000 });
}

export function useNotifications() {
  return useQuery(notificationsQueryOptions());
}

export function useMarkNotificationRead() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: number | 'all') => (id === 'all' ? api.post<void>('/notifications/read-all') : api.post<void>(`/notifications/${id}/read`)),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: notificationKeys.list() }),
  });
}
