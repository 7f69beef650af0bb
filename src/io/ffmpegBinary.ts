/**
 * Where the FFmpeg program is: `ffmpeg` on the PATH (the user's own build, kept up to date by the
 * system), else the prebuilt binary of the optional npm package `@ffmpeg-installer/ffmpeg`
 * (installed by `npm ci` on common platforms), else nowhere. `LAMELLA_FFMPEG` names one
 * explicitly. Only video input needs it.
 */
import { spawnSync } from 'node:child_process';
import { createRequire } from 'node:module';

let cached: string | null | undefined;

function runs(path: string): boolean {
  const result = spawnSync(path, ['-hide_banner', '-version'], { stdio: ['ignore', 'ignore', 'ignore'], timeout: 10_000 });
  return result.status === 0;
}

/** The FFmpeg program to run, or null when none is available. */
export function findFfmpeg(): string | null {
  if (cached !== undefined) return cached;
  const named = process.env.LAMELLA_FFMPEG;
  if (named) return (cached = runs(named) ? named : null);
  if (runs('ffmpeg')) return (cached = 'ffmpeg');
  try {
    const require = createRequire(import.meta.url);
    const installer = require('@ffmpeg-installer/ffmpeg') as { path?: string };
    if (installer.path && runs(installer.path)) return (cached = installer.path);
  } catch {
    // The optional package is not installed on this platform.
  }
  return (cached = null);
}

export const NO_FFMPEG_TEXT =
  'reading video needs FFmpeg: install it (e.g. `apt-get install ffmpeg`) or reinstall Lamella with its optional dependencies (`npm ci`), or set LAMELLA_FFMPEG to an ffmpeg program';
