// The README gallery shows figures that are there: every image the README links is a PNG file of
// the repository (scenes/gallery/, written by `npm run gallery`), and each one is linked once.
// A figure name typed into the README without running the gallery (or a gallery figure renamed
// without the README) fails here instead of showing a broken image.
import { describe, expect, it } from 'vitest';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT } from '../helpers/cli.js';

const README = readFileSync(join(ROOT, 'README.md'), 'utf8');
const images = [...README.matchAll(/!\[[^\]]*\]\(([^)]+)\)/g)].map((m) => m[1]);

describe('README gallery', () => {
  it('links existing PNG figures, each once, the electrode-field figures among them', () => {
    expect(images.length).toBeGreaterThan(10);
    expect(new Set(images).size).toBe(images.length);
    for (const p of images) {
      expect(existsSync(join(ROOT, p)), p).toBe(true);
      // PNG signature (ISO/IEC 15948, §5.2): byte 0x89 then "PNG".
      expect(readFileSync(join(ROOT, p)).subarray(0, 4).toString('latin1'), p).toBe('\x89PNG');
    }
    for (const f of ['qf4r-equipotential', 'qf4r-deviation', 't7t-equipotential', 't7t-deviation', 't7t-multipoles']) {
      expect(images).toContain(`scenes/gallery/field-${f}.png`);
    }
  });
});
