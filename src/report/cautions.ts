/**
 * Cautions printed in every report: what the numbers may be used for, and the usual safety
 * notes for the light sources and chemicals of this work (common practice).
 */

export const cautionParagraphs: readonly string[] = [
  'Thickness maps from photographs are estimates. They are not a substitute for qualified metrology '
    + '(ellipsometry, reflectometry, profilometry) for release or safety decisions; follow your local quality procedures.',
  'Lasers and UV lamps used for monochromatic or fluorescent illumination need eye protection per your local '
    + 'laser and UV safety rules. Handle soap, glycerol and wafer-processing chemicals per their safety data sheets.',
];

export function renderCautions(): string {
  return `<section class="card cautions" id="cautions"><h2>Cautions</h2>${cautionParagraphs.map((p) => `<p>${p}</p>`).join('')}</section>`;
}
