import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import config from "../../../electron.config";

const root = path.resolve(import.meta.dirname, "../../..");
const packageJson = JSON.parse(readFileSync(path.join(root, "package.json"), "utf8")) as { main: string };

/** PNG width and height from the IHDR chunk (PNG specification, section 11.2.2). */
function pngSize(file: string): { width: number; height: number } {
  const bytes = readFileSync(file);
  expect(bytes.subarray(1, 4).toString("latin1"), `${file} is a PNG`).toBe("PNG");
  return { width: bytes.readUInt32BE(16), height: bytes.readUInt32BE(20) };
}

describe("electron.config.ts", () => {
  it("names the app and its output folder", () => {
    expect(config.appId).toBe("app.loopwright.workbench");
    expect(config.productName).toBe("Loopwright");
    expect(config.directories?.output).toBe("out/");
  });

  it("sets every required fuse", () => {
    expect(config.electronFuses).toMatchObject({
      runAsNode: false,
      enableNodeOptionsEnvironmentVariable: false,
      enableNodeCliInspectArguments: false,
      enableEmbeddedAsarIntegrityValidation: true,
      onlyLoadAppFromAsar: true,
      enableCookieEncryption: true,
    });
  });

  it("packs only the bundled main process, the built renderer and package.json", () => {
    expect(config.files).toEqual(["dist/main/**", "dist/renderer/**", "package.json"]);
    // The entry that Electron starts must be inside what is packed.
    expect(packageJson.main.startsWith("dist/main/")).toBe(true);
    expect(existsSync(path.join(root, "package.json"))).toBe(true);
  });

  it("builds AppImage and deb for Linux, nsis for Windows and dmg for macOS", () => {
    expect(config.linux?.target).toEqual(["AppImage", "deb"]);
    expect(config.linux?.category).toBe("Development");
    expect(config.win?.target).toEqual(["nsis"]);
    expect(config.mac?.target).toEqual(["dmg"]);
  });

  it("names icon files that exist", () => {
    const named = [config.linux?.icon, config.win?.icon, config.mac?.icon, config.dmg?.icon];
    for (const icon of named) {
      expect(typeof icon).toBe("string");
      expect(existsSync(path.join(root, icon as string)), String(icon)).toBe(true);
    }
    expect(existsSync(path.join(root, config.directories!.buildResources!))).toBe(true);
  });

  it("ships square PNG icons at every size a desktop asks for, rendered from the SVG", () => {
    expect(existsSync(path.join(root, "assets/icon.svg"))).toBe(true);
    for (const size of [16, 32, 48, 64, 128, 256, 512, 1024]) {
      expect(pngSize(path.join(root, `assets/icons/${size}x${size}.png`))).toEqual({ width: size, height: size });
    }
    expect(pngSize(path.join(root, "assets/icon.png"))).toEqual({ width: 512, height: 512 });
  });
});
