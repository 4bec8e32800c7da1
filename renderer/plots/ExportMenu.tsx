/** Three export buttons: SVG, PNG (2×) and CSV of the plotted data. Downloads via a temporary link. */
import { useState, type RefObject, type Ref } from "react";
import { exportPng } from "./exportPng";
import { exportSvg } from "./exportSvg";
import { toCsv, type CsvColumn } from "./toCsv";

export interface ExportMenuProps {
  svgRef: Ref<SVGSVGElement>;
  /** File stem, e.g. "bode-variant-a". */
  fileName: string;
  csv?: () => CsvColumn[];
}

function download(blob: Blob, name: string): void {
  const url = URL.createObjectURL(blob);
  const a = document.createElement("a");
  a.href = url;
  a.download = name;
  a.click();
  setTimeout(() => URL.revokeObjectURL(url), 0);
}

/** A file-name stem with only letters, digits, dot, dash and underscore. */
export function safeFileStem(name: string): string {
  return name.trim().replace(/[^A-Za-z0-9._-]+/g, "-").replace(/^-+|-+$/g, "") || "plot";
}

export function ExportMenu({ svgRef, fileName, csv }: ExportMenuProps) {
  const [message, setMessage] = useState("");
  const stem = safeFileStem(fileName);
  const svg = () => (svgRef as RefObject<SVGSVGElement | null>)?.current ?? null;
  const run = async (what: "svg" | "png" | "csv") => {
    try {
      const el = svg();
      if (what === "csv") {
        download(new Blob([toCsv(csv ? csv() : [])], { type: "text/csv" }), `${stem}.csv`);
      } else if (!el) {
        setMessage("The plot is not drawn yet; try again in a moment.");
        return;
      } else if (what === "svg") {
        download(new Blob([exportSvg(el)], { type: "image/svg+xml" }), `${stem}.svg`);
      } else {
        download(await exportPng(el, 2), `${stem}.png`);
      }
      setMessage("");
    } catch (error) {
      setMessage(`Export failed: ${error instanceof Error ? error.message : String(error)}`);
    }
  };
  return (
    <span className="lw-export" role="group" aria-label="Export this plot">
      <button type="button" className="button-quiet" onClick={() => void run("svg")}>SVG</button>
      <button type="button" className="button-quiet" onClick={() => void run("png")}>PNG</button>
      <button type="button" className="button-quiet" onClick={() => void run("csv")} disabled={!csv}>CSV</button>
      {message && <span className="error-text lw-export-message" role="status">{message}</span>}
    </span>
  );
}
