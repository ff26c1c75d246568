// Version numbers read the same everywhere: three digits (common practice, no source).
import { describe, it, expect } from 'vitest';
import { versionLabel } from '../../src/lib/vocab';
import { exportFileName, versionLabel as layoutLabel } from '../../src/lib/export/layout';

describe('versionLabel', () => {
  it('pads to three digits and keeps longer numbers whole', () => {
    expect([1, 12, 123, 1234].map(versionLabel)).toEqual(['v001', 'v012', 'v123', 'v1234']);
  });
  it('is the one formatter the export layout uses for file names', () => {
    expect(layoutLabel).toBe(versionLabel);
    const labels = { studioName: 'S', showName: 'Show', shotCode: 'AB_010', versionNumber: 7, artistName: null, date: '2030-01-01', reviewState: 'draft', rateId: '24', cutIn: 1001, sourceTimecodeIn: null };
    expect(exportFileName(labels, 1001, 1010, 'mp4')).toContain('_v007_');
  });
});
