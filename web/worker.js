// amplink analysis worker bootstrap: loads the Go runtime glue, then the
// core-only worker.wasm, and runs it. The Go side installs onmessage itself.
"use strict";
importScripts("wasm_exec.js");

const pending = [];
// Messages that arrive before Go has installed its handler are kept and
// replayed once it is ready.
self.onmessage = (e) => { pending.push(e); };
self.amplinkReady = () => {
  const q = pending.splice(0);
  for (const e of q) {
    self.onmessage(e);
  }
};

const go = new Go();
WebAssembly.instantiateStreaming(fetch("worker.wasm"), go.importObject)
  .then((r) => go.run(r.instance))
  .catch((err) => {
    self.postMessage({ json: JSON.stringify({ op: "fatal", error: "worker start failed: " + err }) });
  });
