import { layoutFigure, type FigureSpec, type Primitive } from './figure';

const escapeXml = (text: string) => text.replace(/[&<>"]/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;' })[c]!);
const n = (v: number) => String(Math.round(v * 100) / 100);

function paint(p: Primitive): string {
  switch (p.type) {
    case 'line':
      return `<polyline points="${p.points.map(([x, y]) => `${n(x)},${n(y)}`).join(' ')}" fill="none" stroke="${p.colour}" stroke-width="${p.width}"${p.dash ? ` stroke-dasharray="${p.dash.join(' ')}"` : ''}/>`;
    case 'marker':
      if (p.shape === 'circle') return `<circle cx="${n(p.x)}" cy="${n(p.y)}" r="${p.radius}" fill="${p.colour}"/>`;
      if (p.shape === 'square') return `<rect x="${n(p.x - p.radius)}" y="${n(p.y - p.radius)}" width="${n(2 * p.radius)}" height="${n(2 * p.radius)}" fill="${p.colour}"/>`;
      return `<polygon points="${n(p.x)},${n(p.y - p.radius * 1.3)} ${n(p.x + p.radius * 1.3)},${n(p.y)} ${n(p.x)},${n(p.y + p.radius * 1.3)} ${n(p.x - p.radius * 1.3)},${n(p.y)}" fill="${p.colour}"/>`;
    case 'text': {
      const rotate = p.rotate ? ` transform="rotate(${p.rotate} ${n(p.x)} ${n(p.y)})"` : '';
      return `<text x="${n(p.x)}" y="${n(p.y)}" font-size="${p.size}" fill="${p.colour}" text-anchor="${p.anchor}"${rotate}>${escapeXml(p.text)}</text>`;
    }
  }
}

/** The figure as a standalone SVG document (white ground, for a paper's pages; the PDF's font first). */
export function svgFigure(spec: FigureSpec): string {
  const scene = layoutFigure(spec);
  return [
    `<?xml version="1.0" encoding="UTF-8"?>`,
    `<svg xmlns="http://www.w3.org/2000/svg" width="${scene.width}" height="${scene.height}" viewBox="0 0 ${scene.width} ${scene.height}" font-family="'DejaVu Sans', 'Helvetica Neue', Arial, sans-serif">`,
    `<title>${escapeXml(spec.title)}</title>`,
    `<rect width="100%" height="100%" fill="#ffffff"/>`,
    ...scene.primitives.map(paint),
    `</svg>`,
    '',
  ].join('\n');
}
