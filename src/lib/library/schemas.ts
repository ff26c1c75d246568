// The shot library's input rules: show and shot forms, table query parameters, imports, plates and scale.
// Browser-safe (zod and plain modules only): the same schemas validate forms in the browser and requests on the server.
import { z } from 'zod';
import { HANDLE_CONVENTIONS, SHOT_STATUSES, type ShotStatus } from '../vocab';
import { FRAME_RATES } from '../timecode';
import { DEFAULT_FIRST_FRAME, DEFAULT_HANDLES } from './handles';

export { DEFAULT_FIRST_FRAME } from './handles';

const req = { required_error: 'is required', invalid_type_error: 'must be text' };
const num = { required_error: 'is required', invalid_type_error: 'must be a number' };

/** A studio's own code for a show or shot: letters, digits, '_', '-', '.'; starts with a letter or digit. */
export const CODE_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_.-]*$/;
const code = (max: number) =>
  z
    .string(req)
    .trim()
    .min(1, 'is required')
    .max(max, `is too long (${max} characters at most)`)
    .regex(CODE_PATTERN, 'may contain only letters, digits, "_", "-" and "." and must start with a letter or digit');

/** A show code: short (the form's hint says so), 16 characters at most. */
export const SHOW_CODE_MAX = 16;
export const showCode = code(SHOW_CODE_MAX);
export const shotCode = code(64);

export const frameRate = z.enum(FRAME_RATES, { errorMap: () => ({ message: `must be one of ${FRAME_RATES.join(', ')}` }) });
export const shotStatus = z.enum(SHOT_STATUSES, { errorMap: () => ({ message: `must be one of ${SHOT_STATUSES.join(', ')}` }) });

const description = z.string(req).trim().max(5000, 'is too long (5000 characters at most)');
const frame = z.number(num).int('must be a whole number').min(0, 'must be 0 or more').max(9_999_999, 'must be at most 9999999');
const handles = z.number(num).int('must be a whole number').min(0, 'must be 0 or more').max(1000, 'must be at most 1000');
const pixels = z.number(num).int('must be a whole number').min(1, 'must be at least 1').max(65_536, 'must be at most 65536');
const pixelAspect = z.number(num).min(0.1, 'must be at least 0.1').max(10, 'must be at most 10');
/** A timecode label HH:MM:SS:FF (';' before the frames for drop frame); the server checks it exists at the shot's rate. */
export const timecodeLabel = z.string(req).trim().regex(/^\d{2}:\d{2}:\d{2}[:;]\d{2}$/, 'must be a timecode like 01:00:10:00');
/** A calendar date, YYYY-MM-DD, that exists. */
export const dueDate = z
  .string(req)
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'must be a date like 2025-03-31')
  .refine((s) => {
    const d = new Date(`${s}T00:00:00Z`);
    return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
  }, 'is not a real date');
/** A user id (the assignee picker's value), or null to clear. */
export const assigneeId = z.string(req).min(1, 'is required').max(40, 'is not a user id');

// ── Shows ────────────────────────────────────────────────────────────────────────────────────────────────────────

export const showCreate = z.object({
  code: showCode,
  name: z.string(req).trim().min(1, 'is required').max(120, 'is too long (120 characters at most)'),
  description: description.nullish(),
  frameRate: frameRate.default('24'),
});
export type ShowCreate = z.infer<typeof showCreate>;

export const showPatch = showCreate
  .partial()
  .extend({ frameRate: frameRate.optional() })
  .refine((v) => Object.keys(v).length > 0, { message: 'send at least one field to change', path: ['(body)'] });
export type ShowPatch = z.infer<typeof showPatch>;

export const archiveBody = z.object({ archived: z.boolean({ required_error: 'is required', invalid_type_error: 'must be true or false' }) });

// ── Shots ────────────────────────────────────────────────────────────────────────────────────────────────────────

const shotFields = {
  code: shotCode,
  description: description.nullish(),
  firstFrame: frame,
  lastFrame: frame,
  /** Frames before the cut in. */
  headHandles: handles,
  /** Frames after the cut out. */
  tailHandles: handles,
  frameRate,
  plateWidth: pixels,
  plateHeight: pixels,
  pixelAspect,
  assigneeId: assigneeId.nullable(),
  dueDate: dueDate.nullable(),
  status: shotStatus,
  sourceTimecodeIn: timecodeLabel.nullable(),
  /** Shot frame number of the plate's first frame (a plate delivered with handles starts before the cut in); null = the cut in. */
  plateFirstFrame: frame.nullable(),
};

const lastNotBeforeFirst = (v: { firstFrame?: number; lastFrame?: number }) =>
  v.firstFrame === undefined || v.lastFrame === undefined || v.lastFrame >= v.firstFrame;

export const shotCreate = z
  .object({
    showId: z.number(num).int('must be a whole number').positive('must be a show id'),
    code: shotFields.code,
    description: shotFields.description,
    firstFrame: frame.default(DEFAULT_FIRST_FRAME),
    lastFrame: frame,
    headHandles: handles.default(DEFAULT_HANDLES),
    tailHandles: handles.default(DEFAULT_HANDLES),
    /** Defaults to the show's rate on the server. */
    frameRate: frameRate.optional(),
    plateWidth: pixels.default(1920),
    plateHeight: pixels.default(1080),
    pixelAspect: pixelAspect.default(1),
    assigneeId: assigneeId.nullish(),
    dueDate: dueDate.nullish(),
    status: shotStatus.default('blocking'),
    /** Source timecode at the cut in; 00:00:00:00 when not given. */
    sourceTimecodeIn: shotFields.sourceTimecodeIn.optional(),
    plateFirstFrame: shotFields.plateFirstFrame.optional(),
  })
  .refine(lastNotBeforeFirst, { message: 'must not be before the cut in', path: ['lastFrame'] });
export type ShotCreate = z.infer<typeof shotCreate>;

/** Partial edit of a shot; the server checks lastFrame ≥ firstFrame against the merged values too. */
export const shotPatch = z
  .object({
    code: shotFields.code,
    description: shotFields.description,
    firstFrame: shotFields.firstFrame,
    lastFrame: shotFields.lastFrame,
    headHandles: shotFields.headHandles,
    tailHandles: shotFields.tailHandles,
    frameRate: shotFields.frameRate,
    plateWidth: shotFields.plateWidth,
    plateHeight: shotFields.plateHeight,
    pixelAspect: shotFields.pixelAspect,
    assigneeId: shotFields.assigneeId,
    dueDate: shotFields.dueDate,
    status: shotFields.status,
    sourceTimecodeIn: shotFields.sourceTimecodeIn,
    plateFirstFrame: shotFields.plateFirstFrame,
  })
  .partial()
  .strict('unknown field')
  .refine((v) => Object.keys(v).length > 0, { message: 'send at least one field to change', path: ['(body)'] })
  .refine(lastNotBeforeFirst, { message: 'must not be before the cut in', path: ['lastFrame'] });
export type ShotPatch = z.infer<typeof shotPatch>;

/** Inline table edit (artists too): status and/or assignee. */
export const shotWorkflowPatch = z
  .object({ status: shotStatus, assigneeId: assigneeId.nullable() })
  .partial()
  .strict('unknown field: only status and assigneeId can be changed here')
  .refine((v) => v.status !== undefined || v.assigneeId !== undefined, { message: 'send status or assigneeId', path: ['(body)'] });

export const bulkStatusBody = z.object({
  ids: z
    .array(z.number(num).int('must be a whole number').positive('must be a shot id'), { required_error: 'is required', invalid_type_error: 'must be a list of shot ids' })
    .min(1, 'choose at least one shot')
    .max(500, 'at most 500 shots at once')
    .refine((ids) => new Set(ids).size === ids.length, 'lists a shot twice'),
  status: shotStatus,
});

// ── Table queries (URL search parameters) ────────────────────────────────────────────────────────────────────────

export const MAX_PAGE_SIZE = 100;
const page = z.coerce.number({ invalid_type_error: 'must be a number' }).int('must be a whole number').min(1, 'must be 1 or more').max(100_000, 'is too large').default(1);
const pageSize = z.coerce
  .number({ invalid_type_error: 'must be a number' })
  .int('must be a whole number')
  .min(1, 'must be 1 or more')
  .max(MAX_PAGE_SIZE, `must be at most ${MAX_PAGE_SIZE}`)
  .default(25);
const order = z.enum(['asc', 'desc'], { errorMap: () => ({ message: 'must be asc or desc' }) }).default('asc');
const q = z.string().trim().max(100, 'is too long (100 characters at most)').optional();
/** false (default): active only; true: archived only; all: both. */
const archived = z.enum(['false', 'true', 'all'], { errorMap: () => ({ message: 'must be false, true or all' }) }).default('false');

export const SHOW_SORTS = ['code', 'name', 'updated', 'shots'] as const;
export const showListQuery = z.object({
  q,
  archived,
  sort: z.enum(SHOW_SORTS, { errorMap: () => ({ message: `must be one of ${SHOW_SORTS.join(', ')}` }) }).default('code'),
  order,
  page,
  pageSize,
});
export type ShowListQuery = z.infer<typeof showListQuery>;

export const SHOT_SORTS = ['code', 'status', 'firstFrame', 'dueDate', 'updated'] as const;
export const shotListQuery = z.object({
  showId: z.coerce.number({ invalid_type_error: 'must be a show id' }).int('must be a show id').positive('must be a show id').optional(),
  /** One status or several separated by commas, e.g. "blocking,in review". */
  status: z
    .string()
    .transform((s, ctx) => {
      const list = s.split(',').map((x) => x.trim()).filter(Boolean);
      const bad = list.filter((x) => !isShotStatus(x));
      if (!list.length || bad.length) {
        ctx.addIssue({ code: z.ZodIssueCode.custom, message: `must be one or more of ${SHOT_STATUSES.join(', ')} (comma-separated)` });
        return z.NEVER;
      }
      return list as ShotStatus[];
    })
    .optional(),
  /** A user id, or "none" for unassigned shots. */
  assignee: z.string().trim().min(1, 'is empty').max(40, 'is not a user id').optional(),
  q,
  archived,
  sort: z.enum(SHOT_SORTS, { errorMap: () => ({ message: `must be one of ${SHOT_SORTS.join(', ')}` }) }).default('code'),
  order,
  page,
  pageSize,
});
export type ShotListQuery = z.infer<typeof shotListQuery>;

// ── Imports ──────────────────────────────────────────────────────────────────────────────────────────────────────

export const MAX_IMPORT_BYTES = 1_000_000;
export const importOptions = z
  .object({
    /** 'clip': code from the clip name (EDL "* FROM CLIP NAME:"); 'pattern': from `pattern`. CSV rows carry their own codes. */
    codeFrom: z.enum(['clip', 'pattern'], { errorMap: () => ({ message: 'must be clip or pattern' }) }).default('clip'),
    /** e.g. "CNB_{n:03}0" → CNB_0010, CNB_0020… Placeholders: {n} (shot count), {event}, {reel}, {clip}; ":03" pads with zeros. */
    pattern: z.string(req).trim().min(1, 'is required').max(64, 'is too long (64 characters at most)').optional(),
    /** Head handles before each cut in and tail handles after each cut out, in frames (a CSV row may carry its own). */
    headHandles: handles.default(DEFAULT_HANDLES),
    tailHandles: handles.default(DEFAULT_HANDLES),
    startFrame: frame.default(DEFAULT_FIRST_FRAME),
    /** Codes typed over the defaults in the preview, by the event's line number in the edit (checked like any code). */
    codes: z
      .record(z.string().regex(/^\d{1,7}$/, 'must be a line number'), z.string(req).trim().max(200, 'is too long (200 characters at most)'))
      .refine((r) => Object.keys(r).length <= 5000, 'names too many lines')
      .optional(),
  })
  .refine((o) => o.codeFrom !== 'pattern' || o.pattern, { message: 'is required when codes come from a pattern', path: ['pattern'] });
export type ImportOptions = z.infer<typeof importOptions>;

export const importBody = z.object({
  format: z.enum(['edl', 'csv'], { errorMap: () => ({ message: 'must be edl or csv' }) }),
  text: z.string(req).min(1, 'is empty').max(MAX_IMPORT_BYTES, `is larger than ${MAX_IMPORT_BYTES} bytes`),
  options: importOptions.default({}),
  /** Confirm only: create and update the valid lines even when other lines have errors. */
  skipErrors: z.boolean({ invalid_type_error: 'must be true or false' }).default(false),
  /** Confirm only: ids of approved shots whose range change the user ticked; other approved shots keep their range. */
  confirmApproved: z.array(z.number(num).int('must be a whole number').positive('must be a shot id'), { invalid_type_error: 'must be a list of shot ids' }).max(5000, 'names too many shots').default([]),
});
export type ImportBody = z.infer<typeof importBody>;

// ── Plates and scale ─────────────────────────────────────────────────────────────────────────────────────────────

export const STILL_TYPES = ['image/png', 'image/jpeg', 'image/webp'] as const;
export const VIDEO_TYPES = ['video/mp4', 'video/quicktime', 'video/webm'] as const;
export const MB = 1024 * 1024;
/** Declared-size limits, bytes. */
export const PLATE_LIMITS = { still: 40 * MB, video: 500 * MB, thumbnail: 2 * MB } as const;

export const plateUploadBody = z
  .object({
    fileName: z.string(req).trim().min(1, 'is required').max(200, 'is too long (200 characters at most)'),
    contentType: z.enum([...STILL_TYPES, ...VIDEO_TYPES], {
      errorMap: () => ({ message: `must be one of ${[...STILL_TYPES, ...VIDEO_TYPES].join(', ')}` }),
    }),
    byteSize: z.number(num).int('must be a whole number').positive('must be more than 0'),
    kind: z.enum(['plate', 'thumbnail'], { errorMap: () => ({ message: 'must be plate or thumbnail' }) }).default('plate'),
  })
  .refine((b) => b.kind !== 'thumbnail' || (STILL_TYPES as readonly string[]).includes(b.contentType), {
    message: 'a thumbnail must be a PNG, JPEG or WebP image',
    path: ['contentType'],
  });
export type PlateUploadBody = z.infer<typeof plateUploadBody>;

/** Sent on completion of a video plate: what the browser's video element measured (the server cannot decode video). */
export const plateCompleteBody = z
  .object({
    width: pixels.optional(),
    height: pixels.optional(),
    durationSeconds: z.number(num).positive('must be more than 0').max(86_400, 'is too long').optional(),
  })
  .strict('unknown field');

export const scaleBody = z.object({
  /** Length of the drawn line in plate pixels. */
  pixels: z.number(num).positive('must be more than 0').max(1_000_000, 'is too large'),
  /** Real length of the same thing, metres. */
  metres: z.number(num).positive('must be more than 0').max(100_000, 'is too large'),
});

export function isShotStatus(value: unknown): value is ShotStatus {
  return typeof value === 'string' && (SHOT_STATUSES as readonly string[]).includes(value);
}

// ── Studio settings ──────────────────────────────────────────────────────────────────────────────────────────────

export const studioSettingsPatch = z
  .object({
    handleConvention: z.enum(HANDLE_CONVENTIONS, { errorMap: () => ({ message: `must be one of ${HANDLE_CONVENTIONS.join(', ')}` }) }),
  })
  .strict();

// ── Prop pictures ────────────────────────────────────────────────────────────────────────────────────────────────

/** A prop picture is a cut-out with alpha: PNG or WebP only (JPEG has no alpha). */
export const PICTURE_TYPES = ['image/png', 'image/webp'] as const;
/**
 * A prop picture's limits: bytes declared and stored, and pixels per side. Every viewer decodes it to RGBA
 * (4 bytes a pixel): 2048 × 2048 is 16 MB, ample for a prop a few hundred pixels tall on a 1080p plate.
 */
export const PICTURE_LIMITS = { bytes: 8 * MB, maxSide: 2048, minSide: 4 } as const;

export const pictureUploadBody = z
  .object({
    fileName: z.string(req).trim().min(1, 'is required').max(200, 'is too long (200 characters at most)'),
    contentType: z.enum(PICTURE_TYPES, { errorMap: () => ({ message: `must be one of ${PICTURE_TYPES.join(', ')} (a picture with alpha)` }) }),
    byteSize: z.number(num).int('must be a whole number').positive('must be more than 0'),
  })
  .strict('unknown field');
export type PictureUploadBody = z.infer<typeof pictureUploadBody>;
