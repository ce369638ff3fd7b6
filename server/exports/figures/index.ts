export { layoutFigure, linearTicks, logTicks, type FigurePoint, type FigureSeries, type FigureSpec, type Scene } from './figure';
export { pdfFigure } from './pdf';
export { svgFigure } from './svg';
export { entropyScalingFigure, spectrumFigure, type EntropyScalingRule, type SpectrumCurve } from './plots';
