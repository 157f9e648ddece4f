const t0=performance.now(); await import('./yb.mjs'); console.log('bundled yargs',(performance.now()-t0).toFixed(1));
