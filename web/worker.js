// The workbench's evaluation worker. The page sends the address of its own module script and its
// compiled WebAssembly module; starting them here runs the same program, which sees it is in a
// worker and from then on answers the page's plans with full evaluations.
self.addEventListener('message', async (event) => {
  const { script, module } = event.data;
  const glue = await import(script);
  await glue.default({ module_or_path: module });
}, { once: true });
