import { useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export interface RunQueueOverview {
  engine: 'embedded' | 'redis';
  state: { accepting: boolean; threads: number; running: number; waiting: number };
  /** BullMQ's job counts per state (RUN_QUEUE=redis); null for the embedded queue or when Redis does not answer. */
  counts: Record<string, number> | null;
}

export function useRunQueue() {
  return useQuery({
    queryKey: ['admin', 'run-queue'],
    queryFn: ({ signal }) => api.get<RunQueueOverview>('/admin/run-queue', { signal }),
    refetchInterval: 5_000,
  });
}
