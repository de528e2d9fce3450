// Text pieces of stage descriptions in figure subtitles (lengths in mm, voltages in V or kV).

type Raw = Readonly<Record<string, unknown>>;
const MM = 1000;
const n = (v: unknown) => (typeof v === 'number' ? v : 0);

/** Stage length along z, mm, one decimal. */
export const lengthMm = (s: Raw) => ((n(s.zEnd) - n(s.zStart)) * MM).toFixed(1);
/** A length field in mm with two decimals (0 when missing). */
export const mm2 = (v: unknown) => (n(v) * MM).toFixed(2);
export const volts = (v: number) => (Math.abs(v) >= 1000 ? `${(v / 1000).toPrecision(3)} kV` : `${v.toPrecision(3)} V`);
