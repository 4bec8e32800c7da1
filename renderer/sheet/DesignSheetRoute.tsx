/** Shows the design sheet when the hash is "#/sheet/<projectId>[/<variantId>]", else the children. */
import { useEffect, useState, type ReactNode } from "react";
import { DesignSheetView, parseSheetRoute, type DesignSheetDeps } from "./DesignSheetView";

export function DesignSheetRoute({ deps, children }: { deps?: DesignSheetDeps; children: ReactNode }) {
  const [hash, setHash] = useState(() => window.location.hash);
  useEffect(() => {
    const onChange = () => setHash(window.location.hash);
    window.addEventListener("hashchange", onChange);
    return () => window.removeEventListener("hashchange", onChange);
  }, []);
  const route = parseSheetRoute(hash);
  if (!deps || !route) return <>{children}</>;
  return <DesignSheetView deps={deps} projectId={route.projectId} variantId={route.variantId} onClose={() => { window.location.hash = ""; }} />;
}
