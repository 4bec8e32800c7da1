import { useEffect, useState, type ReactNode } from "react";
import type { EngineBridge } from "../../../shared-engine/api/contract";
import type { DocumentStore, ProjectRepository } from "../../db";
import { ImportProjectButton } from "./ImportProjectButton";
import { ProjectToolsView, parseToolsRoute } from "./ProjectToolsView";

export interface ProjectToolsDeps {
  documents: DocumentStore;
  bridge: EngineBridge;
  repository: ProjectRepository;
}

function useHash(): string {
  const [hash, setHash] = useState(() => location.hash);
  useEffect(() => {
    const update = () => setHash(location.hash);
    window.addEventListener("hashchange", update);
    return () => window.removeEventListener("hashchange", update);
  }, []);
  return hash;
}

/**
 * Shows the project tools (compare, variants, history) when the address is
 * #/project/<id>/<tab>; otherwise the import button and `children` (the project list).
 */
export function ProjectToolsRoute({ tools, onImported, children }: { tools?: ProjectToolsDeps; onImported: () => void; children: ReactNode }) {
  const route = parseToolsRoute(useHash());
  if (!tools) return <>{children}</>;
  if (route) return <ProjectToolsView key={route.projectId} projectId={route.projectId} tab={route.tab} documents={tools.documents} bridge={tools.bridge} />;
  return (
    <>
      <ImportProjectButton deps={tools} onImported={onImported} />
      {children}
    </>
  );
}
