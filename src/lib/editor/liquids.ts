// The scene's liquids as the Liquids panel edits them: a new liquid from a preset, which standing liquids and spouts
// use a liquid, why a liquid cannot be removed, and problems with a liquid's fields in words. Pure functions; the
// panel changes the document through setSection('liquids', …) so every edit is one undoable command.
import { VISCOSITY_RANGE, type Liquid } from '../scene/schema';
import type { LiquidPreset } from '../scene/liquids';
import { GROUP_LABEL, type EditorDoc, type ItemRef } from './document';

/** The standing liquids and spouts that use liquid `id`. */
export function liquidUsers(doc: EditorDoc, id: string): ItemRef[] {
  return [
    ...doc.pours.filter((p) => p.liquid === id).map((p) => ({ group: 'pours' as const, id: p.id })),
    ...doc.spouts.filter((s) => s.liquid === id).map((s) => ({ group: 'spouts' as const, id: s.id })),
  ];
}

/** "Spout “jet” and Standing liquid “pool”" — the items in words. */
export function itemsInWords(refs: readonly ItemRef[]): string {
  const words = refs.map((r) => `${GROUP_LABEL[r.group]} “${r.id}”`);
  return words.length <= 1 ? words.join('') : `${words.slice(0, -1).join(', ')} and ${words[words.length - 1]}`;
}

/** Why liquid `id` cannot be removed, in words, or null when it can. */
export function whyNotRemovable(doc: EditorDoc, id: string): string | null {
  const users = liquidUsers(doc, id);
  const used = users.length ? `${itemsInWords(users)} ${users.length === 1 ? 'uses' : 'use'} it` : '';
  if (doc.liquids.length <= 1) return `${used ? `${used}, and a` : 'A'} scene needs at least one liquid.`;
  if (!used) return null;
  return `${used}: pick another liquid there before removing it.`;
}

/** A liquid id not yet used in the scene, from `base` ("thick-paint", "thick-paint-2", …). */
export function freeLiquidId(doc: EditorDoc, base: string): string {
  const taken = new Set(doc.liquids.map((l) => l.id));
  const stem = base.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 56) || 'liquid';
  if (!taken.has(stem)) return stem;
  for (let n = 2; ; n++) if (!taken.has(`${stem}-${n}`)) return `${stem}-${n}`;
}

/** A new liquid for the scene from a preset: the preset's name, colour and viscosity, under a free id. */
export function liquidFromPreset(doc: EditorDoc, preset: LiquidPreset): Liquid {
  const names = new Set(doc.liquids.map((l) => l.name));
  let name = preset.name;
  for (let n = 2; names.has(name); n++) name = `${preset.name} ${n}`;
  return { id: freeLiquidId(doc, preset.key), name, colour: preset.colour, viscosity: preset.viscosity };
}

/** The liquids with liquid `id` replaced by `next`. */
export function replaceLiquid(liquids: readonly Liquid[], id: string, next: Liquid): Liquid[] {
  return liquids.map((l) => (l.id === id ? next : l));
}

/** What is wrong with a liquid's name, colour or viscosity, in words (empty: nothing). */
export function liquidProblems(liquid: Liquid): string[] {
  const out: string[] = [];
  if (liquid.name.trim().length === 0) out.push('Give the liquid a name.');
  if (liquid.name.length > 80) out.push('The name can be at most 80 characters.');
  if (!/^#[0-9A-Fa-f]{6}$/.test(liquid.colour)) out.push('The colour must be a colour like #3A8FB7.');
  if (!(liquid.viscosity >= VISCOSITY_RANGE.min && liquid.viscosity <= VISCOSITY_RANGE.max)) {
    out.push(`Viscosity must be between ${VISCOSITY_RANGE.min} and ${VISCOSITY_RANGE.max} m²/s.`);
  }
  return out;
}

/** A kinematic viscosity (m²/s) for people: "1 × 10⁻⁶ m²/s". */
export function viscosityText(nu: number): string {
  if (nu === 0) return '0 m²/s (no viscosity)';
  const exp = Math.floor(Math.log10(nu) + 1e-9);
  const mant = +(nu / 10 ** exp).toPrecision(3);
  if (exp === 0) return `${mant} m²/s`;
  const sup = String(exp).replace(/[-0-9]/g, (c) => '⁻⁰¹²³⁴⁵⁶⁷⁸⁹'['-0123456789'.indexOf(c)]);
  return `${mant === 1 ? '' : `${mant} × `}10${sup} m²/s`;
}
