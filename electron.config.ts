/**
 * Packaging (electron-builder): `npm run dist` → installers in out/.
 * Only the bundled main process (dist/main: main.js, preload.cjs, engineWorker.js, icon.png)
 * and the built renderer (dist/renderer) are packed; the renderer's libraries are bundled by
 * vite and the main process' by esbuild, so no source, test or tool files ship.
 */
import type { Configuration } from "electron-builder";

const config: Configuration = {
  appId: "app.loopwright.workbench",
  productName: "Loopwright",
  copyright: "Copyright © Loopwright developers",
  directories: { output: "out/", buildResources: "assets" },
  files: ["dist/main/**", "dist/renderer/**", "package.json"],
  asar: true,
  // No native modules: nothing to rebuild against Electron's ABI.
  npmRebuild: false,
  linux: {
    target: ["AppImage", "deb"],
    category: "Development",
    icon: "assets/icons",
    synopsis: "Design state-feedback controllers offline",
  },
  deb: { maintainer: "Loopwright developers" },
  win: { target: ["nsis"], icon: "assets/icon.ico" },
  nsis: { oneClick: false, perMachine: false, allowToChangeInstallationDirectory: true },
  mac: { target: ["dmg"], icon: "assets/icon.icns", category: "public.app-category.developer-tools", hardenedRuntime: true },
  dmg: { icon: "assets/icon.icns" },
  // Fuses are flipped in the Electron binary at package time; they cannot be changed at run time.
  electronFuses: {
    // The binary cannot be started as a plain Node (ELECTRON_RUN_AS_NODE): the engine worker is
    // a worker thread, never a forked process, so nothing here needs it.
    runAsNode: false,
    // NODE_OPTIONS / NODE_EXTRA_CA_CERTS and --inspect flags could inject code into the app.
    enableNodeOptionsEnvironmentVariable: false,
    enableNodeCliInspectArguments: false,
    // Load the app only from the packed app.asar, and check its integrity where supported.
    enableEmbeddedAsarIntegrityValidation: true,
    onlyLoadAppFromAsar: true,
    enableCookieEncryption: true,
    // Pages are served from app://, never file://, so file:// needs no extra privileges.
    grantFileProtocolExtraPrivileges: false,
  },
};

export default config;
