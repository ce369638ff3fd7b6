import createPlotlyComponent from 'react-plotly.js/factory';
import Plotly from 'plotly.js-dist-min';

/**
 * Plotly (4.8 MB of minified script) and its React component, bound to the minified distribution (one
 * bundle, no CDN). Only `src/ui/PlotFigure.tsx` loads this module, and only by a dynamic import, so
 * the script arrives with the first plot instead of with every page. Colours and layout defaults are
 * in `plotTheme.ts`.
 */
export const Plot = createPlotlyComponent(Plotly);
export { Plotly };
