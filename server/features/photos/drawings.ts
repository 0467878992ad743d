/**
 * The demo venue's photos, drawn by the project itself (no photographs of real places or products):
 * simple pictures of a hang, as SVG, turned into JPEG files by sharp.
 */
const FRAME = (body: string, caption: string) => `<svg xmlns="http://www.w3.org/2000/svg" width="1200" height="800" viewBox="0 0 1200 800">
  <rect width="1200" height="800" fill="#20262e"/>
  <rect x="0" y="640" width="1200" height="160" fill="#3b3226"/>
  <path d="M60 120h1080" stroke="#9aa4ae" stroke-width="10"/>
  ${body}
  <text x="60" y="760" font-family="sans-serif" font-size="40" fill="#f1f3f4">${caption}</text>
</svg>`;

export const DRAWINGS: Record<string, string> = {
  // Two drapes hung from one batten, folds drawn as stripes.
  'sea-mist-drapes': FRAME(
    `${Array.from({ length: 14 }, (_, i) => `<rect x="${140 + i * 30}" y="128" width="22" height="480" fill="${i % 2 ? '#5f8fa8' : '#6fa3bd'}"/>`).join('')}
     ${Array.from({ length: 14 }, (_, i) => `<rect x="${640 + i * 30}" y="128" width="22" height="480" fill="${i % 2 ? '#5f8fa8' : '#6fa3bd'}"/>`).join('')}`,
    'Line set 7: sea-mist drapes on the batten',
  ),
  // An electric: a pipe with a cable run and fixtures hung under it.
  'first-electric': FRAME(
    `<rect x="160" y="160" width="880" height="70" fill="none" stroke="#c9ced4" stroke-width="8"/>
     ${Array.from({ length: 11 }, (_, i) => `<path d="M${160 + i * 80} 160l80 70" stroke="#c9ced4" stroke-width="5"/>`).join('')}
     ${Array.from({ length: 8 }, (_, i) => `<rect x="${200 + i * 105}" y="250" width="50" height="80" rx="10" fill="#f2c037"/>`).join('')}`,
    'Line set 12: first electric, fixtures under the pipe',
  ),
};
