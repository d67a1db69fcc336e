export const authKeys = {
  all: ['auth'] as const,
  me: () => [...authKeys.all, 'me'] as const,
  signIn: () => [...authKeys.all, 'sign-in'] as const,
};
