// The colour of thermal oxide on silicon under daylight, every 100 nm, as 8-bit sRGB
// (format: 'png' gives the chart as a picture in `bytes`, 'csv' or 'json' as a table).
import { chart } from 'lamella';

const { table } = await chart({ stack: 'oxide-on-silicon', light: 'D65', fromNm: 0, toNm: 500, stepNm: 100 });
table.thicknessesNm.forEach((nm, i) => {
  const [r, g, b] = table.srgb8.subarray(i * 3, i * 3 + 3);
  console.log(`${nm} nm  order ${table.order[i]}  sRGB ${r} ${g} ${b}`);
});
