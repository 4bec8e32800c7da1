export { importProjectText, importProjectFile, importedProjectName, problemsOf, MAX_IMPORT_BYTES, type ImportOutcome, type ImportProblem, type ImportDependencies } from "./importProject";
export { projectFileText, singleVariantDocument, exportFileName, downloadText, exportProject, exportVariant } from "./exportProject";
