/** Public surface of the plots: components, their pure models, export helpers and styles. */
export { Axis, type AxisProps } from "./Axis";
export { linearTicks, logTicks, phaseTicks, steppedTicks, decadeDomain, niceDomain, tickLabel, type AxisModel, type Tick } from "./axisModel";
export { PlotFrame, frameHeaderHeight, type PlotFrameProps } from "./PlotFrame";
export { layoutLegend, legendFor, type LegendEntry } from "./legendModel";
export { OKABE_ITO, seriesStyle, markerPath, crossPath, type SeriesStyle, type MarkerShape } from "./palette";
export { fullPrecision, quantityLabel, type PlotComplex, type Domain, type PlotVariant, type Quantity } from "./plotTypes";
export { zoomDomain, panDomain, equalAspect, valueAtFraction } from "./viewport";
export { useZoomPan } from "./useZoomPan";

export { PoleZeroMap, describePole, poleZeroCsv, type PoleZeroMapProps } from "./PoleZeroMap";
export { poleZeroModel, poleZeroDomain, ZETA_GUIDES, type PoleZeroSeries, type PoleZeroModel } from "./poleZeroModel";
export { movePole, conjugatePartners, constrainPoleTarget, arrowKeyDelta, niceStep, isRealPole } from "./poleDrag";

export { BodePlot, bodeCsv, type BodePlotProps } from "./BodePlot";
export { bodeModel, bodeReadout, interpolateAtFrequency, phaseReference, type BodeSeries, type BodeMargins } from "./bodeModel";

export { ResponsePlot, responseCsv, responseReadout, type ResponsePlotProps } from "./ResponsePlot";
export { responseModel, firstCrossing, type ResponseSeries, type ResponseMetrics } from "./responseModel";

export { RootLocusPlot, type RootLocusPlotProps, type RootLocusData } from "./RootLocusPlot";
export { ParameterLocusPlot, type ParameterLocusPlotProps, type ParameterLocusData } from "./ParameterLocusPlot";
export { locusModel, nearestLocusPoint, type LocusData } from "./locusModel";
export { locusCsv } from "./LocusPlot";

export { exportSvg, type ExportableNode, type StyleReader } from "./exportSvg";
export { exportPng } from "./exportPng";
export { toCsv, type CsvColumn } from "./toCsv";
export { ExportMenu, safeFileStem, type ExportMenuProps } from "./ExportMenu";
