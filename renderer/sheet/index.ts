/** The printable design sheet: the component, the static HTML renderer and the app view. */
export { DesignSheet, SHEET_CAUTIONS } from "./DesignSheet";
export { renderSheetHtml, type RenderSheetInput } from "./renderSheetHtml";
export { buildSheetModel, poleRows, signOffStatus, type PageSize, type SheetInput, type SheetModel } from "./sheetModel";
export { sheetCss, PAGE_GEOMETRY } from "./sheetStyles";
export { DesignSheetView, parseSheetRoute, sheetRouteHash, type DesignSheetDeps } from "./DesignSheetView";
export { DesignSheetRoute } from "./DesignSheetRoute";
export { createDesignSheetStore, type DesignSheetStore, type DesignSheetState } from "./designSheetStore";
