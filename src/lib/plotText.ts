/**
 * Plot text written the way it reads in code (`λ_k`, `N/(4x_k)`, `k^(−0.9)`, `S_∞`) set as Plotly's
 * HTML subset: subscripts and superscripts as <sub>/<sup>, so no figure shows raw TeX-like marks.
 * Applied once, by PlotFigure, to every trace name, hover template, title and annotation.
 */
export function typesetPlotText(text: string): string {
  return text
    .replace(/\^\(([^()]+)\)/g, '<sup>$1</sup>')
    .replace(/\^\{([^{}]+)\}/g, '<sup>$1</sup>')
    .replace(/_\{([^{}]+)\}/g, '<sub>$1</sub>')
    .replace(/([\p{L}\p{N})])_([\p{L}\p{N}∞½.]+)/gu, (_m, base: string, sub: string) => {
      // a trailing full stop ends the sentence, not the subscript
      const trimmed = sub.replace(/\.+$/, '');
      return `${base}<sub>${trimmed}</sub>${sub.slice(trimmed.length)}`;
    });
}

type Json = string | number | boolean | null | undefined | Json[] | { [key: string]: Json };

const textKeys = new Set(['name', 'text', 'hovertemplate', 'legendgrouptitle']);

/** A copy of a plot's data or layout with every text field typeset (keys that hold text, at any depth). */
export function typesetPlotObject<T>(value: T): T {
  const walk = (v: Json, key: string | null): Json => {
    if (typeof v === 'string') return key !== null && textKeys.has(key) ? typesetPlotText(v) : v;
    if (Array.isArray(v)) {
      // coordinates (x, y, error bars) hold no text: handed on as they are, not copied
      if (v.every((item) => typeof item === 'number' || item === null)) return v;
      return key === 'text' ? v.map((item) => (typeof item === 'string' ? typesetPlotText(item) : walk(item, null))) : v.map((item) => walk(item, null));
    }
    if (v !== null && typeof v === 'object' && !ArrayBuffer.isView(v)) {
      const out: Record<string, Json> = {};
      for (const [k, item] of Object.entries(v)) out[k] = walk(item, k);
      return out;
    }
    return v;
  };
  return walk(value as Json, null) as T;
}
