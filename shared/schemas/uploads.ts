import { z } from 'zod';

export const UPLOAD_KINDS = ['image', 'phase-map'] as const;
export type UploadKind = (typeof UPLOAD_KINDS)[number];

/** Limits checked before an upload is decoded. */
export const UPLOAD_LIMITS = {
  maxBytes: 16 * 1024 * 1024,
  maxSide: 4096,
  mimeTypes: ['image/png', 'image/jpeg', 'application/x-npy'],
} as const;

export interface Upload {
  id: number;
  kind: UploadKind;
  name: string;
  mime: string;
  width: number;
  height: number;
  size: number;
  /** SHA-256 of the stored bytes, hex: lets a client see that a file is already uploaded. */
  sha256: string;
  createdAt: string;
  createdBy: { id: number; name: string } | null;
}

/** The form fields sent with an upload's `file`. */
export const createUploadSchema = z.object({
  kind: z.enum(UPLOAD_KINDS, { error: `kind must be one of ${UPLOAD_KINDS.join(', ')}` }),
});
