import { plateWellIds } from '@/schemas/plate';

/*
 * Synthetic kinetic plate files in the Cristae layout (docs/plate-file-format.md), for tests and
 * benchmarks. Deterministic: the same options always give the same text. All values are invented.
 */

export interface MakePlateFileOptions {
  /** Well columns in the order they are written; default all 96 wells, A1 to H12. */
  wells?: readonly string[];
  /** Readings per well; default 60. */
  points?: number;
  /** Seconds between readings; default 10. */
  intervalS?: number;
  /** Linear rate of each well in absorbance units per minute; default a small spread around −0.02. */
  slopeFor?: (well: string) => number;
  /** Absorbance at t = 0; default 0.9. */
  interceptFor?: (well: string) => number;
  delimiter?: 'comma' | 'tab';
  /** Decimals written for each absorbance; default 4. */
  decimals?: number;
  /** Written as a `# wavelength_nm:` comment; null leaves it out. Default 340. */
  wavelengthNm?: number | null;
}

export function defaultSlopeFor(well: string): number {
  const i = plateWellIds.indexOf(well);
  return -0.02 + 0.0004 * (i < 0 ? 0 : i % 24);
}

/** Absorbance the generator writes for `well` at time `t` seconds, before rounding. */
export function syntheticAbsorbance(
  t: number,
  well: string,
  slopeFor: (well: string) => number = defaultSlopeFor,
  interceptFor: (well: string) => number = () => 0.9,
): number {
  return interceptFor(well) + (slopeFor(well) * t) / 60;
}

/** Returns the text of a synthetic plate file; write it to disk with fs if a path is needed. */
export function makePlateFile(options: MakePlateFileOptions = {}): string {
  const {
    wells = plateWellIds,
    points = 60,
    intervalS = 10,
    slopeFor = defaultSlopeFor,
    interceptFor = () => 0.9,
    delimiter = 'comma',
    decimals = 4,
    wavelengthNm = 340,
  } = options;
  const sep = delimiter === 'tab' ? '\t' : ',';
  const lines: string[] = ['# Synthetic plate file (invented values, generated for tests)'];
  if (wavelengthNm !== null) lines.push(`# wavelength_nm: ${wavelengthNm}`);
  lines.push(['time_s', ...wells].join(sep));
  for (let i = 0; i < points; i += 1) {
    const t = i * intervalS;
    const cells = wells.map((w) =>
      syntheticAbsorbance(t, w, slopeFor, interceptFor).toFixed(decimals),
    );
    lines.push([String(t), ...cells].join(sep));
  }
  return `${lines.join('\n')}\n`;
}
