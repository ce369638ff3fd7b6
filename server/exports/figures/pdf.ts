import PDFDocument from 'pdfkit';
import { layoutFigure, type FigureSpec, type Primitive } from './figure';

/**
 * PDF's standard fonts cover only Latin-1, so without a Unicode font (the service hands one in) the
 * symbols are spelled out instead of dropped.
 */
const latinSpelling: Record<string, string> = {
  'λ': 'lambda', 'ℓ': 'l', '√': 'sqrt ', 'π': 'pi', 'ρ': 'rho', 'μ': 'mu', 'α': 'alpha', '⟨': '<', '⟩': '>', '−': '-', '∪': 'u',
  'ₖ': '_k', 'ᶜ': '_c', 'ₐ': '_a', '₁': '1', '₂': '2', '⁻': '-', '⁰': '0', '¹': '1', '²': '2', '³': '3', '⁴': '4', '⁵': '5', '⁶': '6', '⁷': '7', '⁸': '8', '⁹': '9', '∞': 'inf', '–': '-', '≤': '<=', '·': '.',
};
const latin = (text: string) => text.replace(/[^\u0000-\u00ff]/g, (c) => latinSpelling[c] ?? '?');

/** The figure as a one-page PDF of the scene's size (points), drawn by pdfkit; `font` is a TrueType font with the symbols. */
export function pdfFigure(spec: FigureSpec, options: { font?: Buffer | null } = {}): Promise<Buffer> {
  const scene = layoutFigure(spec);
  const doc = new PDFDocument({ size: [scene.width, scene.height], margin: 0, info: { Title: spec.title, Producer: 'Tacet', Creator: 'Tacet' } });
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('data', (chunk: Buffer) => chunks.push(chunk));
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  const unicode = Boolean(options.font);
  if (options.font) doc.registerFont('figure', options.font);
  doc.font(unicode ? 'figure' : 'Helvetica');
  const text = (t: string) => (unicode ? t : latin(t));
  for (const p of scene.primitives) draw(doc, p, text);
  doc.end();
  return done;
}

function draw(doc: PDFKit.PDFDocument, p: Primitive, text: (t: string) => string): void {
  switch (p.type) {
    case 'line': {
      const [first, ...rest] = p.points;
      if (!first) return;
      doc.save().moveTo(first[0], first[1]);
      for (const [x, y] of rest) doc.lineTo(x, y);
      doc.lineWidth(p.width).strokeColor(p.colour);
      if (p.dash) doc.dash(p.dash[0]!, { space: p.dash[1] ?? p.dash[0]! });
      doc.stroke().undash().restore();
      return;
    }
    case 'marker':
      if (p.shape === 'circle') doc.circle(p.x, p.y, p.radius).fill(p.colour);
      else if (p.shape === 'square') doc.rect(p.x - p.radius, p.y - p.radius, 2 * p.radius, 2 * p.radius).fill(p.colour);
      else doc.polygon([p.x, p.y - p.radius * 1.3], [p.x + p.radius * 1.3, p.y], [p.x, p.y + p.radius * 1.3], [p.x - p.radius * 1.3, p.y]).fill(p.colour);
      return;
    case 'text': {
      const content = text(p.text);
      doc.fontSize(p.size).fillColor(p.colour);
      const width = doc.widthOfString(content);
      const dx = p.anchor === 'middle' ? -width / 2 : p.anchor === 'end' ? -width : 0;
      // pdfkit places text by its top; the scene gives the baseline, as SVG does
      const top = -doc.currentLineHeight() * 0.78;
      doc.save();
      if (p.rotate) doc.rotate(p.rotate, { origin: [p.x, p.y] });
      doc.text(content, p.x + dx, p.y + top, { lineBreak: false });
      doc.restore();
      return;
    }
  }
}
