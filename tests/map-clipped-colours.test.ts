// Clipped pixels: glare or a vivid colour? A lamp's glint clips two or three channels (near white);
// a camera picture style's saturation boost pushes vivid film colours past the encoding in one
// channel. The first is not film (with a halo around it), the second is film. Round trips through
// our own forward model on the bench's invented light scenes (bench/light-scenes.js: a lab's
// draining soap film, close up through a picture style — an S-curve and a BT.601 chroma boost of
// 1.25, ITU-R BT.601 — and in its wire frame before a dark cloth with two lamp glints).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { mapOptionsFor } from '../bench/field-scenes.js';
import { insideFilmScore, outsideFilmScore } from '../bench/field-score.js';
import { soapFilmPictureStyle, soapFilmStyledUnevenInFrame } from '../bench/light-scenes.js';
import { mapPhotoFile } from '../src/map/mapPhoto.js';

const dir = mkdtempSync(join(tmpdir(), 'lamella-clipped-'));

async function mapScene(scene: Awaited<ReturnType<typeof soapFilmPictureStyle>>) {
  const path = join(dir, scene.fileName);
  writeFileSync(path, scene.photo);
  return mapPhotoFile(path, mapOptionsFor(scene, { filmArea: 'auto' }));
}

describe('clipped pixels in the film area', () => {
  it('a picture style that clips vivid colours in one channel: the film keeps ≥ 95 % coverage (no glint halos across it)', async () => {
    const scene = await soapFilmPictureStyle();
    // The photo does clip: some film pixels of the decoded JPEG hold a channel at full scale
    // (254–255, the mapper's clipping level) with another well below.
    const { data } = await sharp(scene.photo).raw().toBuffer({ resolveWithObject: true });
    let oneChannel = 0;
    for (let p = 0; p < scene.width * scene.height; p++) {
      const v = [data[p * 3], data[p * 3 + 1], data[p * 3 + 2]];
      if (scene.film[p] && Math.max(...v) >= 254 && Math.min(...v) < 180) oneChannel++;
    }
    expect(oneChannel).toBeGreaterThan(200);
    const score = insideFilmScore(scene, await mapScene(scene));
    expect(score.coverage).toBeGreaterThanOrEqual(0.95);
    expect(score.gross).toBeLessThanOrEqual(0.01);
  }, 60_000);

  it('lamp glints (near white, clipped) are still not film: outside the film ≤ 1 % gets a thickness', async () => {
    const scene = await soapFilmStyledUnevenInFrame();
    const result = await mapScene(scene);
    expect(outsideFilmScore(scene, result).fraction).toBeLessThanOrEqual(0.01);
    expect(insideFilmScore(scene, result).coverage).toBeGreaterThanOrEqual(0.95);
  }, 90_000);
});
