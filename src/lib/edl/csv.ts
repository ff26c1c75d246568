// Reads a shot list as CSV: header `code,first,last[,handles,description]` (frame numbers: the cut in and out) or
// `code,tc_in,tc_out[,handles,description]` (timecodes at the show's rate, out exclusive as in an edit list).
// Optional columns either way: handles (both ends) or head_handles and tail_handles, source_in (source timecode of
// the cut in), reel, clip_name.
import { framesToTimecode, timecodeToFrames, TimecodeError, type FrameRate } from '../timecode';
import type { EdlLineError } from './cmx3600';

export interface CsvShotRow {
  line: number;
  code: string;
  /** Given as frame numbers (first..last inclusive) … */
  first?: number;
  last?: number;
  /** … or as timecodes: record in/out frame counts, out exclusive. */
  recordIn?: string;
  recordOut?: string;
  recordInFrame?: number;
  recordOutFrame?: number;
  /** Frames before the cut in and after the cut out, when the row gives them. */
  headHandles?: number;
  tailHandles?: number;
  description?: string;
  /** Source timecode of the cut-in frame, normalised at the rate. */
  sourceIn?: string;
  reel?: string;
  clipName?: string;
}

export interface ParsedCsv {
  mode: 'frames' | 'timecode' | null;
  rows: CsvShotRow[];
  errors: EdlLineError[];
}

/** Splits CSV text into records of fields (RFC 4180 quoting), each with the line number it starts on. */
export function splitCsv(text: string): { line: number; fields: string[] }[] {
  const records: { line: number; fields: string[] }[] = [];
  const src = text.replace(/^\uFEFF/, '');
  let fields: string[] = [];
  let field = '';
  let quoted = false;
  let line = 1;
  let startLine = 1;
  let touched = false;
  for (let i = 0; i < src.length; i++) {
    const ch = src[i];
    if (quoted) {
      if (ch === '"') {
        if (src[i + 1] === '"') {
          field += '"';
          i++;
        } else quoted = false;
      } else {
        if (ch === '\n') line++;
        field += ch;
      }
      continue;
    }
    if (ch === '"' && field === '') {
      quoted = true;
      touched = true;
    } else if (ch === ',') {
      fields.push(field);
      field = '';
      touched = true;
    } else if (ch === '\n' || ch === '\r') {
      if (ch === '\r' && src[i + 1] === '\n') i++;
      fields.push(field);
      if (touched || fields.some((f) => f.trim() !== '')) records.push({ line: startLine, fields });
      fields = [];
      field = '';
      touched = false;
      line++;
      startLine = line;
    } else {
      field += ch;
      if (ch.trim() !== '') touched = true;
    }
  }
  fields.push(field);
  if (touched || fields.some((f) => f.trim() !== '')) records.push({ line: startLine, fields });
  return records;
}

const HEADER_ALIASES: Record<string, string> = {
  code: 'code',
  shot: 'code',
  first: 'first',
  first_frame: 'first',
  last: 'last',
  last_frame: 'last',
  tc_in: 'tc_in',
  record_in: 'tc_in',
  in: 'tc_in',
  tc_out: 'tc_out',
  record_out: 'tc_out',
  out: 'tc_out',
  handles: 'handles',
  head_handles: 'head_handles',
  head: 'head_handles',
  tail_handles: 'tail_handles',
  tail: 'tail_handles',
  description: 'description',
  source_in: 'source_in',
  src_in: 'source_in',
  source_timecode_in: 'source_in',
  reel: 'reel',
  clip_name: 'clip_name',
  clip: 'clip_name',
};

const INT = /^-?\d+$/;

/** Parses a shot list. Timecode rows are read at `rate`; every unreadable line is reported with its number. */
export function parseShotCsv(text: string, rate: FrameRate): ParsedCsv {
  const records = splitCsv(text);
  const out: ParsedCsv = { mode: null, rows: [], errors: [] };
  if (!records.length) {
    out.errors.push({ line: 1, message: 'the file is empty: expected a header line such as code,first,last' });
    return out;
  }
  const header = records[0];
  const columns = header.fields.map((f) => HEADER_ALIASES[f.trim().toLowerCase().replace(/[\s-]+/g, '_')] ?? null);
  const unknown = header.fields.filter((_, i) => columns[i] === null).map((f) => f.trim());
  const col = (name: string) => columns.indexOf(name);
  const hasFrames = col('first') >= 0 && col('last') >= 0;
  const hasTc = col('tc_in') >= 0 && col('tc_out') >= 0;
  if (col('code') < 0 || (!hasFrames && !hasTc) || unknown.length) {
    out.errors.push({
      line: header.line,
      message:
        `header must be code,first,last[,handles,description] or code,tc_in,tc_out[,handles,description]` +
        (unknown.length ? `; unknown column${unknown.length > 1 ? 's' : ''}: ${unknown.join(', ')}` : ''),
    });
    return out;
  }
  out.mode = hasFrames ? 'frames' : 'timecode';

  for (const rec of records.slice(1)) {
    const get = (name: string) => {
      const i = col(name);
      return i >= 0 ? (rec.fields[i] ?? '').trim() : '';
    };
    const fail = (message: string) => out.errors.push({ line: rec.line, message });
    if (rec.fields.length > header.fields.length && rec.fields.slice(header.fields.length).some((f) => f.trim() !== '')) {
      fail(`has ${rec.fields.length} fields but the header has ${header.fields.length}`);
      continue;
    }
    const row: CsvShotRow = { line: rec.line, code: get('code') };
    if (!row.code) {
      fail('code is empty');
      continue;
    }
    // "handles" gives both ends; head_handles / tail_handles give one end each (and win over "handles").
    let badHandles = false;
    for (const [name, ends] of [['handles', ['headHandles', 'tailHandles']], ['head_handles', ['headHandles']], ['tail_handles', ['tailHandles']]] as const) {
      const value = get(name);
      if (value === '') continue;
      if (!INT.test(value) || Number(value) < 0) {
        fail(`${name} must be a whole number of frames, 0 or more, found "${value}"`);
        badHandles = true;
        break;
      }
      for (const end of ends) row[end] = Number(value);
    }
    if (badHandles) continue;
    const description = get('description');
    if (description) row.description = description;
    const sourceIn = get('source_in');
    if (sourceIn) {
      try {
        row.sourceIn = framesToTimecode(timecodeToFrames(sourceIn, rate), rate);
      } catch (e) {
        fail(e instanceof TimecodeError ? `bad source_in: ${e.message}` : 'bad source_in');
        continue;
      }
    }
    const reel = get('reel');
    if (reel) row.reel = reel.slice(0, 64);
    const clipName = get('clip_name');
    if (clipName) row.clipName = clipName.slice(0, 255);
    if (out.mode === 'frames') {
      const first = get('first');
      const last = get('last');
      if (!INT.test(first) || !INT.test(last)) {
        fail(`first and last must be whole frame numbers, found "${first}" and "${last}"`);
        continue;
      }
      row.first = Number(first);
      row.last = Number(last);
      if (row.first < 0) {
        fail('first must be 0 or more');
        continue;
      }
      if (row.last < row.first) {
        fail(`last (${row.last}) is before first (${row.first})`);
        continue;
      }
    } else {
      row.recordIn = get('tc_in');
      row.recordOut = get('tc_out');
      try {
        row.recordInFrame = timecodeToFrames(row.recordIn, rate);
        row.recordOutFrame = timecodeToFrames(row.recordOut, rate);
      } catch (e) {
        fail(e instanceof TimecodeError ? `bad timecode: ${e.message}` : 'bad timecode');
        continue;
      }
      if (row.recordOutFrame <= row.recordInFrame) {
        fail(`tc_out ${row.recordOut} must be after tc_in ${row.recordIn}`);
        continue;
      }
    }
    out.rows.push(row);
  }
  return out;
}
