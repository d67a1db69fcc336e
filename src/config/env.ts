import { z } from 'zod';

const envSchema = z.object({
  API_URL: z
    .string()
    .regex(/^\/[A-Za-z0-9/_-]*[^/]$/, 'VITE_API_URL must be a same-origin path such as /api')
    .default('/api'),
});

function readEnv() {
  const parsed = envSchema.safeParse({ API_URL: import.meta.env.VITE_API_URL || undefined });
  if (!parsed.success) {
    const lines = parsed.error.issues.map((issue) => `${issue.path.join('.')}: ${issue.message}`);
    throw new Error(`Invalid client environment:\n${lines.join('\n')}`);
  }
  return parsed.data;
}

export const env = readEnv();
