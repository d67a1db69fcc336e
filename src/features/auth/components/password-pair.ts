import { z } from 'zod';

/** Adds a "type it again" field to a schema whose new password sits under `passwordKey`. */
export function withConfirmation<Shape extends z.ZodRawShape>(schema: z.ZodObject<Shape>, passwordKey: keyof Shape & string) {
  return schema
    .extend({ confirmPassword: z.string() })
    .refine((values) => {
      const record = values as Record<string, unknown>;
      return record[passwordKey] === record.confirmPassword;
    }, {
      path: ['confirmPassword'],
      message: 'The two passwords are not the same',
    });
}
