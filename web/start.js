// amplink page start-up. It runs just before go-app's app.js (both are
// deferred, and the site writer puts this one first), which streams
// app.wasm into WebAssembly.instantiateStreaming and then calls go.run.
// Both are changed here to keep the page's main thread free:
//  - the module is compiled from its bytes (WebAssembly.instantiate), whose
//    decoding runs off the main thread, rather than streamed, whose
//    decoding runs on it as the bytes arrive;
//  - the Go program starts one task after the module is ready: Chromium
//    compiles each wasm function on its first call, so starting the runtime
//    in the same task would make that task too long. The Go side splits the
//    rest (see app/startup).
"use strict";
(() => {
  const delayRun = () => {
    if (typeof Go !== "function" || Go.prototype.amplinkDelayed) {
      return;
    }
    const run = Go.prototype.run;
    Go.prototype.run = function (instance) {
      return new Promise((resolve) => setTimeout(resolve, 0)).then(() => run.call(this, instance));
    };
    Go.prototype.amplinkDelayed = true;
  };
  WebAssembly.instantiateStreaming = async (source, imports) => {
    delayRun();
    const bytes = await (await source).arrayBuffer();
    return WebAssembly.instantiate(bytes, imports);
  };
})();
