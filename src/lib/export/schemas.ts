// Input rules for stored exports and share links (the same zod schemas run in the browser and on the server).
import { z } from 'zod';
import { EXPORT_FORMATS } from './layout';
import { RENDER_LOOKS } from '../render/looks';

export const MB = 1024 * 1024;
/** Largest export the store takes: a full-resolution PNG ZIP of a long shot is the big one. */
export const MAX_EXPORT_BYTES = 1024 * MB;

const frame = z.number({ invalid_type_error: 'must be a number' }).int('must be a whole number').min(0, 'must not be negative').max(10_000_000, 'is too large');

export const exportOptions = z
  .object({
    first: frame,
    last: frame,
    width: z.number().int('must be a whole number').min(16, 'must be at least 16').max(8192, 'must be at most 8192'),
    height: z.number().int('must be a whole number').min(16, 'must be at least 16').max(8192, 'must be at most 8192'),
    look: z.enum(RENDER_LOOKS, { errorMap: () => ({ message: `must be one of ${RENDER_LOOKS.join(', ')}` }) }),
    slate: z.boolean(),
    /** How long the slate is held, in seconds (the same in every format; 1 s when left out). */
    slateSeconds: z.number({ invalid_type_error: 'must be a number of seconds' }).min(0.1, 'must be at least 0.1 s').max(10, 'must be at most 10 s').optional(),
    burnIns: z.boolean(),
    plate: z.boolean(),
    loop: z.boolean().optional(),
    /** Motion blur: the shutter angle in degrees (the shutter open for angle/360 of each frame); 0 or left out: none. */
    shutterAngle: z
      .number({ invalid_type_error: 'must be a number of degrees' })
      .int('must be a whole number of degrees')
      .min(0, 'must be between 0 and 360 degrees')
      .max(360, 'must be between 0 and 360 degrees')
      .optional(),
    frameCount: z.number().int().min(1).max(100_000).optional(),
  })
  .strict()
  .refine((o) => o.last >= o.first, { message: 'must not be before first', path: ['last'] });

export const exportStartBody = z
  .object({
    format: z.enum(EXPORT_FORMATS, { errorMap: () => ({ message: `must be one of ${EXPORT_FORMATS.join(', ')}` }) }),
    byteSize: z
      .number({ required_error: 'is required', invalid_type_error: 'must be a number of bytes' })
      .int('must be a whole number of bytes')
      .min(1, 'must be at least 1 byte'),
    fileName: z
      .string({ required_error: 'is required' })
      .trim()
      .min(1, 'is required')
      .max(160, 'is too long (160 characters at most)')
      .regex(/^[A-Za-z0-9][A-Za-z0-9._-]*$/, 'may hold only letters, digits, ".", "_" and "-"'),
    options: exportOptions,
    /** When a ready export of the version already has this file name: store this one under a numbered name, or replace it. */
    sameName: z.enum(['number', 'replace'], { errorMap: () => ({ message: "must be 'number' or 'replace'" }) }).optional(),
  })
  .strict();
export type ExportStartBody = z.infer<typeof exportStartBody>;

/** A share link's expiry: a date (YYYY-MM-DD, the end of that day in UTC) or an ISO date-time, in the future, ≤ 1 year. */
export const MAX_SHARE_DAYS = 365;
const expiry = z
  .string({ required_error: 'is required' })
  .trim()
  .refine((s) => /^\d{4}-\d{2}-\d{2}$/.test(s) || !Number.isNaN(Date.parse(s)), 'is not a date (YYYY-MM-DD)')
  .transform((s) => (/^\d{4}-\d{2}-\d{2}$/.test(s) ? new Date(`${s}T23:59:59.000Z`) : new Date(s)))
  .refine((d) => !Number.isNaN(d.getTime()), 'is not a date (YYYY-MM-DD)')
  .refine((d) => d.getTime() > Date.now(), 'must be in the future')
  .refine((d) => d.getTime() <= Date.now() + MAX_SHARE_DAYS * 86_400_000, `must be within ${MAX_SHARE_DAYS} days`);

const clientEmail = z.string().trim().toLowerCase().max(254, 'is too long (254 characters at most)').email('is not an e-mail address');
const note = z.string().trim().max(1000, 'is too long (1000 characters at most)');

export const shareCreateBody = z
  .object({
    expiresAt: expiry,
    password: z
      .string()
      .max(200, 'is too long (200 characters at most)')
      .refine((p) => p === '' || p.length >= 6, 'must be at least 6 characters (or leave it empty)')
      .optional(),
    exportAssetId: z.number().int('must be an export id').positive('must be an export id').nullable().optional(),
    email: z.union([z.literal(''), clientEmail]).optional(),
    message: note.optional(),
  })
  .strict();
export type ShareCreateBody = z.infer<typeof shareCreateBody>;

export const shareSendBody = z
  .object({
    token: z.string({ required_error: 'is required' }).trim().min(1, 'is required').max(64, 'is not this link’s token'),
    email: clientEmail,
    message: note.optional(),
  })
  .strict();

export const shareUnlockBody = z.object({ password: z.string({ required_error: 'is required' }).min(1, 'is required').max(200, 'is too long') }).strict();

export const guestNoteBody = z
  .object({
    name: z.string({ required_error: 'is required' }).trim().min(1, 'is required').max(80, 'is too long (80 characters at most)'),
    body: z.string({ required_error: 'is required' }).trim().min(1, 'is required').max(2000, 'is too long (2000 characters at most)'),
    frame: frame,
  })
  .strict();
