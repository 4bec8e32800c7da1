export * from "./parseMatrixText";
export * from "./documentEdits";
export * from "./designHelpers";
export * from "./workspaceStore";
export * from "./workspaceCommands";
