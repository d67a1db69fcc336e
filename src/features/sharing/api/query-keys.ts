export const sharingKeys = {
  all: ['sharing'] as const,
  accessTokens: () => [...sharingKeys.all, 'access-tokens'] as const,
  shareLinks: (projectId: number, runId: number) => [...sharingKeys.all, 'share-links', projectId, runId] as const,
  shared: (token: string) => [...sharingKeys.all, 'shared', token] as const,
};
