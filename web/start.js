// amplink page start-up. go-app's app.js streams app.wasm into
// WebAssembly.instantiateStreaming and calls go.run at once. Both are
// changed here to keep the page's main thread free:
//  - the module is compiled from its bytes (WebAssembly.instantiate), whose
//    decoding runs off the main thread, rather than streamed, whose
//    decoding runs on it as the bytes arrive;
//  - the Go program starts one task after the module is ready (Chromium
//    compiles each wasm function on its first call, so starting the runtime
//    in the same task would make that task too long; the Go side splits the
//    rest, see wasm/startup).
"use strict";
(() => {
  WebAssembly.instantiateStreaming = async (source, imports) => {
    const bytes = await (await source).arrayBuffer();
    return WebAssembly.instantiate(bytes, imports);
  };
  const run = Go.prototype.run;
  Go.prototype.run = function (instance) {
    return new Promise((resolve) => setTimeout(resolve, 0)).then(() => run.call(this, instance));
  };
})();
