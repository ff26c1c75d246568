// The shipped Space Grotesk (from @fontsource, served by us) registered for canvas text: slates and burn-ins wait
// for it, so the first exported frame never falls back to another face.
import w500 from '@fontsource/space-grotesk/files/space-grotesk-latin-500-normal.woff2?url';
import w600 from '@fontsource/space-grotesk/files/space-grotesk-latin-600-normal.woff2?url';
import w700 from '@fontsource/space-grotesk/files/space-grotesk-latin-700-normal.woff2?url';
import { BURN_IN_FONT } from './layout';

let loading: Promise<void> | null = null;

/** Resolves once the weights the export draws with are loaded; rejects when the font cannot be read. */
export function loadExportFont(): Promise<void> {
  loading ??= (async () => {
    const faces = [
      new FontFace(BURN_IN_FONT, `url(${w500})`, { weight: '500' }),
      new FontFace(BURN_IN_FONT, `url(${w600})`, { weight: '600' }),
      new FontFace(BURN_IN_FONT, `url(${w700})`, { weight: '700' }),
    ];
    for (const f of faces) document.fonts.add(f);
    await Promise.all(faces.map((f) => f.load()));
    await Promise.all(['500', '600', '700'].map((w) => document.fonts.load(`${w} 16px "${BURN_IN_FONT}"`)));
  })().catch((err) => {
    loading = null;
    throw new Error(`The Space Grotesk font could not be loaded for the burn-ins (${err instanceof Error ? err.message : err})`);
  });
  return loading;
}
