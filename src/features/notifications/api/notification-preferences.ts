import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { NotificationPreferences } from '@shared/schemas/review';
import { api } from '@/lib/api-client';
import { notificationKeys } from '@/features/notifications/api/notifications';

const preferencesKey = () => [...notificationKeys.all, 'preferences'] as const;

export function getNotificationPreferences(signal?: AbortSignal): Promise<{ preferences: NotificationPreferences }> {
  return api.get<{ preferences: NotificationPreferences }>('/notifications/preferences', { signal });
}

export function notificationPreferencesQueryOptions() {
  return queryOptions({
    queryKey: preferencesKey(),
    queryFn: ({ signal }) => getNotificationPreferences(signal),
    select: (data) => data.preferences,
  });
}

export function useNotificationPreferences() {
  return useQuery(notificationPreferencesQueryOptions());
}

export function useUpdateNotificationPreferences() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (preferences: NotificationPreferences) =>
      api.put<{ preferences: NotificationPreferences }>('/notifications/preferences', preferences),
    onSuccess: (data) => queryClient.setQueryData(preferencesKey(), data),
  });
}
