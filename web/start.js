// amplink page start-up: go-app's app.js instantiates app.wasm and calls
// go.run at once, in the same main-thread task that finished the module.
// Chromium compiles each wasm function on its first call, so starting the
// Go runtime there makes that one task too long. This starts the program
// one task later instead; the Go side splits the rest (wasm/startup).
"use strict";
(() => {
  const run = Go.prototype.run;
  Go.prototype.run = function (instance) {
    return new Promise((resolve) => setTimeout(resolve, 0)).then(() => run.call(this, instance));
  };
})();
