import { describe, expect, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import type { ProjectFile } from "../../shared-engine/api/contract";
import { sampleProject } from "../app/db/sampleProject";
import { launchBrowser, useServedRenderer } from "./helpers";

const env = useServedRenderer();

interface StoredState {
  latest: { revision: number; document: ProjectFile } | null;
  revisions: { revision: number; document: ProjectFile }[];
  /** Error text from project.load for the latest document, or null when it validates. */
  loadError: string | null;
}

/** Reads the project's rows straight from IndexedDB and validates the latest document through the page's engine. */
async function readStored(page: Page, projectId: string): Promise<StoredState> {
  return page.evaluate(async (id) => {
    const db = await new Promise<IDBDatabase>((resolve, reject) => {
      const request = indexedDB.open("loopwright");
      request.onsuccess = () => resolve(request.result);
      request.onerror = () => reject(request.error);
    });
    const read = <T,>(store: string, query: IDBValidKey | IDBKeyRange, all: boolean) =>
      new Promise<T>((resolve, reject) => {
        const os = db.transaction(store, "readonly").objectStore(store);
        const request = all ? os.index("projectId").getAll(query) : os.get(query);
        request.onsuccess = () => resolve(request.result as T);
        request.onerror = () => reject(request.error);
      });
    const latest = (await read<StoredState["latest"] | undefined>("documents", id, false)) ?? null;
    const revisions = await read<StoredState["revisions"]>("revisions", id, true);
    db.close();
    let loadError: string | null = null;
    if (latest) {
      try {
        await window.__loopwrightBridge!.request("project.load", { text: JSON.stringify(latest.document) });
      } catch (error) {
        loadError = (error as Error).message;
      }
    }
    return { latest, revisions, loadError };
  }, projectId);
}

/** The committed state is whole: latest = the highest revision, same document, and it validates. */
function expectConsistent(state: StoredState): void {
  expect(state.latest).not.toBeNull();
  const numbers = state.revisions.map((r) => r.revision).sort((a, b) => a - b);
  expect(numbers).toEqual(Array.from({ length: numbers.length }, (_, i) => i + 1));
  expect(state.latest!.revision).toBe(numbers[numbers.length - 1]);
  expect(state.latest!.document).toEqual(state.revisions.find((r) => r.revision === state.latest!.revision)!.document);
  expect(state.loadError).toBeNull();
}

async function openApp(context: BrowserContext): Promise<Page> {
  const page = context.pages()[0] ?? (await context.newPage());
  await page.goto(`${env.server.url}?e2e=1`);
  await page.getByTestId("project-count").filter({ hasText: /project/ }).waitFor();
  return page;
}

async function importSample(page: Page, name: string): Promise<string> {
  await page.getByTestId("import-file").setInputFiles({ name: "sample.json", mimeType: "application/json", buffer: Buffer.from(JSON.stringify(sampleProject(name))) });
  const row = page.locator("tr[data-project-id]", { has: page.locator(".project-name", { hasText: name }) });
  await row.waitFor();
  return (await row.getAttribute("data-project-id"))!;
}

async function openTools(page: Page, projectId: string, tab: "compare" | "variants" | "history"): Promise<void> {
  await page.goto(`${env.server.url}?e2e=1#/project/${encodeURIComponent(projectId)}/${tab}`);
  await page.getByTestId("revision-label").filter({ hasText: /revision/ }).waitFor();
}

describe("reliability of saved projects in browser mode", () => {
  it("reopens at the last committed, valid revision after the browser is closed in the middle of a save", async () => {
    let context = await launchBrowser(env.profileDir);
    let page = await openApp(context);
    const projectId = await importSample(page, "Closed while saving");
    let committed = 1;
    for (let round = 0; round < 3; round++) {
      await openTools(page, projectId, "variants");
      // Start a save and close the browser at once, without waiting for the save to finish.
      void page.locator('[data-variant-id="lqr-soft"]').getByRole("button", { name: "Duplicate" }).click({ noWaitAfter: true }).catch(() => undefined);
      await new Promise((resolve) => setTimeout(resolve, round * 15));
      await context.close();

      context = await launchBrowser(env.profileDir);
      page = await openApp(context);
      const stored = await readStored(page, projectId);
      expectConsistent(stored);
      // Either the save committed whole (one more revision) or not at all.
      expect([committed, committed + 1]).toContain(stored.latest!.revision);
      committed = stored.latest!.revision;
      await openTools(page, projectId, "history");
      expect(await page.getByTestId("revision-label").textContent()).toBe(`revision ${committed}`);
    }
    await context.close();
  });

  it("two tabs saving the same project at once: one wins and the other shows a conflict, or the second builds on the first; never mixed", async () => {
    const context = await launchBrowser(env.profileDir);
    const first = await openApp(context);
    const projectId = await importSample(first, "Two tabs");
    const second = await context.newPage();
    await openTools(first, projectId, "variants");
    await openTools(second, projectId, "variants");

    await Promise.all([
      first.locator('[data-variant-id="lqr-soft"]').getByRole("button", { name: "Duplicate" }).click(),
      second.locator('[data-variant-id="poles-fast"]').getByRole("button", { name: "Duplicate" }).click(),
    ]);
    // Let both saves settle and the cross-tab message arrive.
    await expect.poll(async () => (await readStored(first, projectId)).latest!.revision, { timeout: 10_000 }).toBeGreaterThanOrEqual(2);
    await first.waitForTimeout(500);
    const notices = await Promise.all([first, second].map(async (p) => ((await p.getByTestId("tools-notice").count()) > 0 ? await p.getByTestId("tools-notice").textContent() : "")));
    const conflictShown = notices.some((n) => /^Not saved: This project was changed elsewhere/.test(n ?? ""));
    const stored = await readStored(first, projectId);
    expectConsistent(stored);
    const ids = stored.latest!.document.variants.map((v) => v.id);
    if (conflictShown) {
      // The later save was refused and nothing of it was stored.
      expect(stored.latest!.revision).toBe(2);
      expect(ids.filter((id) => id.endsWith("-copy"))).toHaveLength(1);
    } else {
      // The second save was based on the first (it heard of it in time): both edits, in sequence.
      expect(stored.latest!.revision).toBe(3);
      expect(ids).toEqual(expect.arrayContaining(["lqr-soft-copy", "poles-fast-copy"]));
      expect(stored.revisions.find((r) => r.revision === 2)!.document.variants.filter((v) => v.id.endsWith("-copy"))).toHaveLength(1);
    }
    // Both tabs end up showing the stored latest revision once the loser reloads.
    for (const page of [first, second]) {
      const reload = page.getByRole("button", { name: "Load the newer revision" });
      if ((await reload.count()) > 0) await reload.click();
      await expect.poll(() => page.getByTestId("revision-label").textContent()).toBe(`revision ${stored.latest!.revision}`);
    }
    await context.close();
  });
});
