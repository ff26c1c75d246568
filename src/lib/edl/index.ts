// Importing shots from an edit: CMX 3600 edit lists, CSV shot lists, and the preview against a show's shots.
export { parseCmx3600, isPictureEvent, type EdlEvent, type EdlLineError, type ParsedEdl } from './cmx3600';
export { parseShotCsv, splitCsv, type CsvShotRow, type ParsedCsv } from './csv';
export {
  planFromEdl,
  planFromCsv,
  previewImport,
  fillPattern,
  codeFromClipName,
  skipReason,
  type SkippedEvent,
  type PlanOptions,
  type PlannedShot,
  type ShotSource,
  type ExistingShot,
  type ImportPreview,
} from './preview';

import type { FrameRate } from '../timecode';
import { parseCmx3600 } from './cmx3600';
import { parseShotCsv } from './csv';
import { planFromCsv, planFromEdl, previewImport, type ExistingShot, type ImportPreview, type PlanOptions } from './preview';

/** Parses EDL or CSV text at the show's rate and previews it against the show's existing shots. */
export function previewText(format: 'edl' | 'csv', text: string, rate: FrameRate, existing: ExistingShot[], options: PlanOptions): ImportPreview & { title: string | null } {
  if (format === 'edl') {
    const parsed = parseCmx3600(text, rate);
    const plan = planFromEdl(parsed, options);
    return { title: parsed.title, ...previewImport(existing, plan.shots, plan.errors, undefined, plan.skipped) };
  }
  const plan = planFromCsv(parseShotCsv(text, rate), options);
  return { title: null, ...previewImport(existing, plan.shots, plan.errors) };
}
export { writeCmx3600, reelToken, EdlWriteError, type EdlWriteEvent } from './write';
