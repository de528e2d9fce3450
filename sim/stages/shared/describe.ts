// Text pieces of stage descriptions in figure subtitles (lengths in mm, voltages in V or kV).

type Raw = Readonly<Record<string, unknown>>;
const MM = 1000;
const n = (v: unknown) => (typeof v === 'number' ? v : 0);

/** Stage length along z, mm, one decimal. */
export const lengthMm = (s: Raw) => ((n(s.zEnd) - n(s.zStart)) * MM).toFixed(1);
/** A length field in mm with two decimals (0 when missing). */
export const mm2 = (v: unknown) => (n(v) * MM).toFixed(2);
export const volts = (v: number) => (Math.abs(v) >= 1000 ? `${(v / 1000).toPrecision(3)} kV` : `${v.toPrecision(3)} V`);

/**
 * A voltage for an electrode label: three significant figures without trailing zeros, in V or kV
 * ("138 V", "3.3 kV", "0 V"); the sign only when asked for or negative.
 */
export function voltLabel(v: number, signed = false): string {
  const k = Math.abs(v) >= 1000;
  const x = Number((k ? v / 1000 : v).toPrecision(3));
  // Typographic minus, as in the rods' ±.
  const text = `${x === 0 ? 0 : x} ${k ? 'kV' : 'V'}`.replace(/^-/, '−');
  return signed && x > 0 ? `+${text}` : text;
}

/**
 * The stage as stored in the run folder: the renderer's placed stages carry it as `stored` beside
 * their common fields (render/scene3d/runInput.ts), other callers pass it directly.
 */
export const storedStage = (s: Raw): Raw => (typeof s.stored === 'object' && s.stored !== null ? (s.stored as Raw) : s);

/** Number field of a stored stage, or undefined. */
export const num = (v: unknown): number | undefined => (typeof v === 'number' && Number.isFinite(v) ? v : undefined);

/** RF amplitude of a stored stage's `rf` block, V (0 when missing). */
export const rfAmplitude = (s: Raw): number => num((s.rf as Raw | undefined)?.amplitude) ?? 0;

/** "138 V + 832 V RF", "832 V RF", "138 V" or "0 V": the DC and RF (zero-to-peak) on an electrode. */
export function dcPlusRf(dc: number, rf: number): string {
  if (rf === 0) return voltLabel(dc);
  // An RF drive in antiphase reads "− 832 V RF", not "+ −832 V RF".
  return dc === 0 ? `${voltLabel(rf)} RF` : rf < 0 ? `${voltLabel(dc)} − ${voltLabel(-rf)} RF` : `${voltLabel(dc)} + ${voltLabel(rf)} RF`;
}
