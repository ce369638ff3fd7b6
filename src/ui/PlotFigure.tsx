import type Plotly from 'plotly.js-dist-min';
import { lazy, Suspense, useMemo, useRef, useState } from 'react';
import { typesetPlotObject } from '../lib/plotText';
import { baseLayout, tidyLogAxes } from '../lib/plotTheme';
import { Button } from './Button';
import { Loading } from './States';

// Plotly is most of the client's script; a dynamic import puts it in a chunk of its own that only a
// page with a figure fetches (once: the module promise is cached by the browser).
const loadPlotly = () => import('../lib/plotly');
const Plot = lazy(async () => ({ default: (await loadPlotly()).Plot }));

interface PlotFigureProps {
  /** accessible name of the figure and the start of the downloaded file's name */
  title: string;
  fileName: string;
  data: Record<string, unknown>[];
  layout: Record<string, unknown>;
  height?: number;
  caption?: React.ReactNode;
}

/**
 * One Tacet figure: the plot in the shared palette, a caption, and PNG/SVG downloads of exactly what
 * is shown (Plotly.downloadImage of the live graph, so zoom and hidden traces carry over).
 */
export function PlotFigure({ title, fileName, data, layout, height = 420, caption }: PlotFigureProps) {
  const graph = useRef<HTMLElement | null>(null);
  const [error, setError] = useState<string | null>(null);
  const typesetData = useMemo(() => typesetPlotObject(data), [data]);
  const typesetLayout = useMemo(() => typesetPlotObject(tidyLogAxes(baseLayout({ height, autosize: true, ...layout }), data)), [layout, data, height]);

  async function download(format: 'png' | 'svg') {
    if (!graph.current) return;
    setError(null);
    try {
      const { Plotly } = await loadPlotly();
      await Plotly.downloadImage(graph.current as Plotly.PlotlyHTMLElement, {
        format,
        filename: fileName,
        width: graph.current.clientWidth || 900,
        height,
        ...(format === 'png' ? { scale: 2 } : {}),
      } as Plotly.DownloadImgopts);
    } catch (cause) {
      setError(`The ${format.toUpperCase()} could not be made: ${cause instanceof Error ? cause.message : String(cause)}`);
    }
  }

  return (
    <figure aria-label={title} className="flex flex-col gap-2" data-testid={`figure-${fileName}`}>
      <Suspense
        fallback={
          <div style={{ width: '100%', height }}>
            <Loading label="Loading the plot" />
          </div>
        }
      >
        <Plot
          data={typesetData as Plotly.Data[]}
          layout={typesetLayout as Partial<Plotly.Layout>}
          // no stock toolbar: it covered the first legend entry, and our PNG/SVG buttons sit below; zoom by drag, reset by double-click
          config={{ displaylogo: false, responsive: true, displayModeBar: false }}
          useResizeHandler
          style={{ width: '100%', height }}
          onInitialized={(_figure, div) => {
            graph.current = div;
          }}
          onUpdate={(_figure, div) => {
            graph.current = div;
          }}
        />
      </Suspense>
      <figcaption className="flex flex-wrap items-baseline justify-between gap-4 border-t border-rule pt-2 text-xs text-ink-soft">
        <span>{caption}</span>
        <span className="flex gap-3 whitespace-nowrap">
          <Button variant="quiet" className="text-xs" onClick={() => download('png')}>
            PNG
          </Button>
          <Button variant="quiet" className="text-xs" onClick={() => download('svg')}>
            SVG
          </Button>
        </span>
      </figcaption>
      {error && (
        <p role="alert" className="text-xs text-danger">
          {error}
        </p>
      )}
    </figure>
  );
}
