// `?inline` CSS imports give the stylesheet as text (Vite; the sheet bundle's esbuild plugin in
// scripts/build-node.mjs does the same), so the printable sheet can inline the plot styles.
declare module "*.css?inline" {
  const css: string;
  export default css;
}
