/* Build: custom functions (functions.js + functions.json) and the task pane page, for one
 * shared runtime. `PUBLIC_URL` (default https://localhost:3000/) is the https base address the
 * built files will be served from; it is written into manifest.xml and the help links. */
const path = require("path");
const fs = require("fs");
const HtmlWebpackPlugin = require("html-webpack-plugin");
const CopyWebpackPlugin = require("copy-webpack-plugin");
const CustomFunctionsMetadataPlugin = require("custom-functions-metadata-plugin");
const { sources } = require("webpack");

const DEV_URL = "https://localhost:3000/";

function publicUrl() {
  let u = process.env.PUBLIC_URL || DEV_URL;
  if (!/^https:\/\//.test(u)) throw new Error(`PUBLIC_URL must be an https address, got ${u}`);
  if (!u.endsWith("/")) u += "/";
  return u;
}

/** Post-process functions.json: allow error values into `any` parameters (the generator cannot
 * emit this flag), remove `allowCustomDataForDataTypeAny` (the generator always adds it; it needs
 * CustomFunctionsRuntime 1.4, which retail and volume-licensed Office 2021 lack, and the add-in uses
 * no data types — see DEVELOPERS.md "Host requirements"), and point help links at the deployment
 * address. */
class FunctionsJsonPostProcess {
  constructor(base) {
    this.base = base;
  }
  apply(compiler) {
    compiler.hooks.thisCompilation.tap("FunctionsJsonPostProcess", (compilation) => {
      compilation.hooks.processAssets.tap({ name: "FunctionsJsonPostProcess", stage: compilation.constructor.PROCESS_ASSETS_STAGE_REPORT }, () => {
        const asset = compilation.getAsset("functions.json");
        if (!asset) return;
        const meta = JSON.parse(asset.source.source().toString());
        const out = { allowErrorForDataTypeAny: true, ...meta };
        delete out.allowCustomDataForDataTypeAny;
        for (const f of out.functions) if (f.helpUrl) f.helpUrl = f.helpUrl.replace(DEV_URL, this.base);
        compilation.updateAsset("functions.json", new sources.RawSource(JSON.stringify(out, null, 2)));
      });
    });
  }
}

module.exports = (env, argv) => {
  const dev = argv.mode !== "production";
  const base = publicUrl();
  const config = {
    devtool: dev ? "source-map" : false,
    entry: {
      functions: "./src/functions/functions.ts",
      taskpane: "./src/taskpane/taskpane.ts",
    },
    output: {
      path: path.resolve(__dirname, "dist"),
      filename: "[name].js",
      // A fixed public path: "auto" would read document.currentScript, and functions.js must
      // run where there is no DOM.
      publicPath: "",
      clean: true,
    },
    resolve: { extensions: [".ts", ".js"] },
    module: {
      rules: [{ test: /\.ts$/, exclude: /node_modules/, use: { loader: "ts-loader", options: { configFile: "tsconfig.build.json" } } }],
    },
    performance: { hints: false },
    plugins: [
      new CustomFunctionsMetadataPlugin({ input: "./src/functions/functions.ts", output: "functions.json" }),
      new FunctionsJsonPostProcess(base),
      new HtmlWebpackPlugin({
        filename: "taskpane.html",
        template: "./src/taskpane/taskpane.html",
        chunks: ["functions", "taskpane"],
        chunksSortMode: "manual",
        inject: "body",
        scriptLoading: "blocking",
      }),
      new CopyWebpackPlugin({
        patterns: [
          { from: "assets/*.png", to: "assets/[name][ext]" },
          { from: "src/taskpane/taskpane.css", to: "taskpane.css" },
          { from: "README.md", to: "README.md" },
          {
            from: "manifest.xml",
            to: "manifest.xml",
            transform: (content) => content.toString().split(DEV_URL).join(base),
          },
        ],
      }),
      new HelpPage(),
    ],
    devServer: {
      // this computer only (not every network interface)
      host: process.env.COLSPACE_HOST || "localhost",
      port: 3000,
      static: { directory: path.resolve(__dirname, "dist") },
      headers: { "Access-Control-Allow-Origin": "*" },
      server: serverOptions(),
      // No injected dev client: functions.js must stay free of DOM and WebSocket code. Reload the pane by hand.
      client: false,
      hot: false,
      liveReload: false,
    },
  };
  return config;
};

/** HTTPS for the dev server, from the certificates that scripts/start.mjs prepared. */
function serverOptions() {
  const dir = process.env.COLSPACE_CERT_DIR;
  if (!dir || !fs.existsSync(path.join(dir, "localhost.crt"))) return "https";
  return {
    type: "https",
    options: {
      key: fs.readFileSync(path.join(dir, "localhost.key")),
      cert: fs.readFileSync(path.join(dir, "localhost.crt")),
      ca: fs.readFileSync(path.join(dir, "ca.crt")),
    },
  };
}

/** help.html: the README rendered as a plain page, the target of the functions' help links. */
class HelpPage {
  apply(compiler) {
    compiler.hooks.thisCompilation.tap("HelpPage", (compilation) => {
      compilation.hooks.processAssets.tap({ name: "HelpPage", stage: compilation.constructor.PROCESS_ASSETS_STAGE_ADDITIONAL }, () => {
        const { renderMarkdown } = require("./scripts/markdown.js");
        const md = fs.readFileSync(path.resolve(__dirname, "README.md"), "utf8");
        compilation.emitAsset("help.html", new sources.RawSource(renderMarkdown(md, "Colspace help")));
      });
    });
  }
}
