// The colour of thermal oxide on silicon under daylight, every 100 nm, as 8-bit sRGB.
import { chartTable, resolveLight, resolveStack } from 'lamella';

const chart = chartTable({ stack: resolveStack('oxide-on-silicon'), light: resolveLight('D65'), angleRad: 0, fromNm: 0, toNm: 500, stepNm: 100 });
chart.thicknessesNm.forEach((nm, i) => {
  const [r, g, b] = chart.srgb8.subarray(i * 3, i * 3 + 3);
  console.log(`${nm} nm  order ${chart.order[i]}  sRGB ${r} ${g} ${b}`);
});
