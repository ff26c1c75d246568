// Starting liquids the editor offers (name, colour, kinematic viscosity ν in m²/s). Every liquid shares one
// density, 1000 kg/m³ (water), so ν here is the liquid's dynamic viscosity μ (Pa·s) divided by 1000 — a
// stand-in that keeps the liquid's look of thickness, not its weight. Paints and syrups thin with shear and
// temperature; one Newtonian value per preset is a previs simplification.
import { DEFAULT_LIQUID } from './schema';

export interface LiquidPreset {
  key: string;
  name: string;
  colour: string;
  /** Kinematic viscosity, m²/s. */
  viscosity: number;
  /** Where the value comes from. */
  source: string;
}

export const LIQUID_PRESETS: readonly LiquidPreset[] = [
  {
    key: 'water', name: DEFAULT_LIQUID.name, colour: DEFAULT_LIQUID.colour, viscosity: DEFAULT_LIQUID.viscosity,
    // μ = 1.002 mPa·s and ρ = 998.2 kg/m³ at 20 °C give ν = 1.004e-6 m²/s; rounded.
    source: 'CRC Handbook of Chemistry and Physics, water at 20 °C (μ 1.002 mPa·s, ρ 998 kg/m³)',
  },
  {
    key: 'thin-paint', name: 'Thin paint', colour: '#D9A441', viscosity: 1e-3,
    source: 'from memory: thinned emulsion or poster paint, about 1 Pa·s at low shear',
  },
  {
    key: 'thick-paint', name: 'Thick paint', colour: '#C8341E', viscosity: 1e-2,
    source: 'from memory: undiluted emulsion or heavy-body acrylic, about 10 Pa·s at low shear',
  },
  {
    key: 'syrup', name: 'Syrup', colour: '#B5651D', viscosity: 5e-2,
    source: 'from memory: golden syrup at room temperature, a few × 10⁻² m²/s (strongly temperature dependent)',
  },
];

/** The preset with this key, or undefined. */
export function liquidPreset(key: string): LiquidPreset | undefined {
  return LIQUID_PRESETS.find((p) => p.key === key);
}
