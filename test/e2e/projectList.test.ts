import { describe, expect, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import { DEMO_PROJECT_NAME } from "../../renderer/db/demoProject";
import { ENGINE_VERSION } from "../../shared-engine/version";
import { launchBrowser, screenshotPath, watchPageProblems, useServedRenderer } from "./helpers";

const PROJECT = "Pump station level loop";

const env = useServedRenderer();

async function openApp(context: BrowserContext): Promise<{ page: Page; problems: string[] }> {
  const page = context.pages()[0] ?? (await context.newPage());
  const problems = watchPageProblems(page, env.server.url.replace(/\/$/, ""));
  await page.goto(env.server.url);
  await page.getByRole("heading", { name: "Projects" }).waitFor();
  await page.getByTestId("project-count").filter({ hasText: /project/ }).waitFor();
  return { page, problems };
}

const rowNames = (page: Page) => page.locator(".project-table .project-name").allTextContents();

describe("project list in browser mode", () => {
  it("creates a project that survives a reload and a browser restart, with the demo project created once", async () => {
    let context = await launchBrowser(env.profileDir);
    try {
      const { page, problems } = await openApp(context);
      expect(await rowNames(page)).toEqual([DEMO_PROJECT_NAME]);
      // The status line proves the bridge path: the version comes from engine.info in the worker.
      await expect.poll(() => page.getByTestId("engine-status").textContent()).toBe(`Engine ${ENGINE_VERSION} ready`);

      await page.getByLabel("New project").fill(PROJECT);
      await page.getByLabel("New project").press("Enter");
      await page.locator(".project-name", { hasText: PROJECT }).waitFor();

      await page.reload();
      await page.locator(".project-name", { hasText: PROJECT }).waitFor();
      expect(await rowNames(page)).toEqual([DEMO_PROJECT_NAME, PROJECT]);
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }

    context = await launchBrowser(env.profileDir);
    try {
      const { page, problems } = await openApp(context);
      await page.locator(".project-name", { hasText: PROJECT }).waitFor();
      expect(await rowNames(page)).toEqual([DEMO_PROJECT_NAME, PROJECT]);
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it("renames with the keyboard, deletes only after the in-page confirmation, and undoes the delete", async () => {
    const context = await launchBrowser(env.profileDir);
    try {
      const { page, problems } = await openApp(context);
      await page.getByRole("button", { name: `Rename ${PROJECT}` }).focus();
      await page.keyboard.press("Enter");
      const field = page.getByLabel(`New name for ${PROJECT}`);
      await expect.poll(() => field.evaluate((el) => el === document.activeElement)).toBe(true);
      await page.keyboard.type("Reservoir level loop");
      await page.screenshot({ path: screenshotPath("project-list-rename.png") });
      await page.keyboard.press("Enter");
      await page.locator(".project-name", { hasText: "Reservoir level loop" }).waitFor();
      // Focus returns to the row's Rename button, so the keyboard user keeps their place.
      await expect.poll(() => page.evaluate(() => document.activeElement?.getAttribute("aria-label"))).toBe("Rename Reservoir level loop");

      await page.getByRole("button", { name: "Delete Reservoir level loop" }).click();
      const confirm = page.getByRole("group", { name: "Confirm deleting Reservoir level loop" });
      await confirm.waitFor();
      await page.screenshot({ path: screenshotPath("project-list-confirm-delete.png") });
      await page.keyboard.press("Escape"); // focus is on Keep inside the group: Escape cancels
      await confirm.waitFor({ state: "detached" });
      expect(await rowNames(page)).toContain("Reservoir level loop");

      await page.getByRole("button", { name: "Delete Reservoir level loop" }).click();
      await confirm.getByRole("button", { name: "Delete", exact: true }).click();
      await page.locator(".project-name", { hasText: "Reservoir level loop" }).waitFor({ state: "detached" });
      await page.getByRole("button", { name: "Undo" }).click();
      await page.locator(".project-name", { hasText: "Reservoir level loop" }).waitFor();
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it("checks the engine from the page and saves light and dark screenshots at 1366×768", async () => {
    const context = await launchBrowser(env.profileDir);
    try {
      const { page, problems } = await openApp(context);
      await page.getByRole("button", { name: "Check the engine" }).click();
      // Eigenvalues of [[0, 1], [−2, −3]] are −1 and −2: roots of s² + 3s + 2 (common practice).
      await expect.poll(() => page.getByTestId("engine-check").textContent()).toMatch(/= (−1, −2|−2, −1)$/);
      await page.screenshot({ path: screenshotPath("project-list.png") });
      // At the smallest target width every row action sits inside the table, apart from its
      // neighbours (the Compare & history link once touched Open and pushed Delete past the card).
      const layout = await page.evaluate(() => {
        const table = document.querySelector(".project-table")!.getBoundingClientRect();
        const boxes = [...document.querySelectorAll(".project-table tbody tr:first-child .cell-actions > *")].map((e) => e.getBoundingClientRect());
        return { tableRight: table.right, rights: boxes.map((b) => b.right), lefts: boxes.map((b) => b.left) };
      });
      expect(layout.rights.length).toBe(4);
      for (const right of layout.rights) expect(right).toBeLessThanOrEqual(layout.tableRight);
      for (let k = 1; k < layout.lefts.length; k++) expect(layout.lefts[k]! - layout.rights[k - 1]!).toBeGreaterThanOrEqual(4);

      await page.getByRole("button", { name: "Theme: follow system" }).click(); // → light
      await page.getByRole("button", { name: "Theme: light" }).click(); // → dark
      await expect.poll(() => page.evaluate(() => document.documentElement.dataset.theme)).toBe("dark");
      await page.screenshot({ path: screenshotPath("project-list-dark.png") });
      await page.reload();
      await expect.poll(() => page.evaluate(() => document.documentElement.dataset.theme)).toBe("dark");
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it("shows the empty state when every project is deleted", async () => {
    const context = await launchBrowser(env.profileDir);
    try {
      const { page } = await openApp(context);
      for (const name of await rowNames(page)) {
        await page.getByRole("button", { name: `Delete ${name}` }).click();
        await page.getByRole("group", { name: `Confirm deleting ${name}` }).getByRole("button", { name: "Delete", exact: true }).click();
        await page.locator(".project-name", { hasText: name }).waitFor({ state: "detached" });
      }
      await page.getByTestId("empty-state").waitFor();
      await page.screenshot({ path: screenshotPath("project-list-empty.png") });
      // The demo is not re-created on the next start: the one-time flag is in the database.
      await page.reload();
      await page.getByTestId("empty-state").waitFor();
    } finally {
      await context.close();
    }
  });
});
