// Map a photo held in memory and read its numbers: no files written.
import { readFileSync } from 'node:fs';
import { mapPhoto } from 'lamella';

const bytes = readFileSync(new URL('../fixtures/demo/film_008.jpg', import.meta.url));
const result = await mapPhoto(bytes, { name: 'film_008.jpg', stack: 'soap-film', light: 'D65', thinBelowNm: 100 });
const { median_nm: median, coverage } = result.stats;
console.log(`median ${median.toFixed(1)} nm, coverage ${(100 * coverage).toFixed(1)} %, ${result.thinRegions.length} thin region(s)`);
