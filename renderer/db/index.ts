export { createDatabase, type LoopwrightDatabase, type ProjectRecord, type MetaRecord, type OpenDatabaseOptions } from "./database";
export { SCHEMA_VERSIONS, CURRENT_SCHEMA_VERSION, DATABASE_NAME, declareSchema, nameKeyOf, type SchemaVersion } from "./schema";
export {
  createProjectRepository,
  randomProjectId,
  type ProjectRepository,
  type ProjectListing,
  type NewProject,
  type RepositoryOptions,
} from "./projectRepository";
export { MAX_PROJECT_NAME_LENGTH, MAX_PROJECT_DESCRIPTION_LENGTH, normaliseProjectName, readProjectRecord, type ProjectInputReason } from "./projectRecord";
export { ensureDemoProject, DEMO_PROJECT_NAME, DEMO_PROJECT_DESCRIPTION, DEMO_CREATED_KEY } from "./demoProject";
export type { DocumentRecord, RevisionRecord, SignOffRecord, SettingRecord } from "./database";
export {
  createDexieDocumentStore,
  restoreRevision,
  requestPersistentStorage,
  isQuotaError,
  storageError,
  DOCUMENT_CHANNEL_NAME,
  type DexieDocumentStore,
  type DexieDocumentStoreOptions,
  type ChannelLike,
  type DocumentSavedMessage,
} from "./dexieDocumentStore";
export { readStoredDocument } from "./storedDocumentCheck";
export { emptyDocument, createMemoryDocumentStore, type DocumentStore, type StoredDocument, type RevisionSummary } from "./documentStore";
