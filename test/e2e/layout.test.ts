/**
 * Page layout at the smallest target window (1366×768, launchBrowser's viewport): no screen of the
 * demo project may scroll sideways. Long unbroken values (JSON lists in the comparison's
 * parameter table) once widened the project tools page to about 2,300 px.
 */
import { describe, expect, it } from "vitest";
import { DEMO_PROJECT_NAME } from "../../renderer/db/demoProject";
import { useOpenedApp } from "./helpers";

const app = useOpenedApp();

/** How far the page reaches past the window's width, in CSS pixels (0 when it fits). */
const sidewaysOverflow = (): Promise<number> =>
  app.page.evaluate(() => Math.max(document.documentElement.scrollWidth, document.body.scrollWidth) - window.innerWidth);

describe("layout at 1366×768", () => {
  it("the project list fits the window", async () => {
    expect(await sidewaysOverflow()).toBeLessThanOrEqual(0);
  });

  it("the demo project's workspace fits the window on every tab", async () => {
    await app.page.getByRole("button", { name: `Open ${DEMO_PROJECT_NAME}` }).click();
    await app.page.getByTestId("workspace").waitFor();
    // The seven section tabs sit on one row.
    const tabTops = await app.page.getByRole("tab").evaluateAll((tabs) => tabs.map((t) => Math.round(t.getBoundingClientRect().top)));
    expect(tabTops.length).toBe(7);
    expect(new Set(tabTops).size, `tab rows at ${tabTops.join(", ")}`).toBe(1);
    for (const tab of await app.page.getByRole("tab").allTextContents()) {
      await app.page.getByRole("tab", { name: tab, exact: true }).click();
      expect(await sidewaysOverflow(), `tab ${tab}`).toBeLessThanOrEqual(0);
    }
    await app.page.getByRole("button", { name: "← Projects" }).click();
    await app.page.getByTestId("project-count").filter({ hasText: /project/ }).waitFor();
  });

  it("the demo project's comparison, parameter table included, fits the window", async () => {
    await app.page.getByRole("link", { name: `Compare and history of ${DEMO_PROJECT_NAME}` }).click();
    await app.page.getByTestId("spec-diff").waitFor();
    // Measure with the metric table and plots filled in, not just the document's parameters.
    await expect.poll(() => app.page.getByTestId("evaluation-status").textContent(), { timeout: 60_000 }).toBe("Designed from revision 1");
    // The parameter table lists the demo's nonlinear-check times, a JSON list with no spaces.
    expect(await app.page.getByTestId("spec-diff").locator("tbody th").allTextContents()).toContain("nonlinearCheck");
    expect(await sidewaysOverflow()).toBeLessThanOrEqual(0);
    expect(app.problems).toEqual([]);
  });
});
