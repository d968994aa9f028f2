// infoscope live profile: the front end of infoscope.widgets (plain ES modules, no
// framework, nothing fetched at run time), bundled by esbuild into
// src/infoscope/widgets/static/profile.js. Every column name and value is data: it
// reaches the page only through textContent, attribute values or canvas fillText.
//
// The default export is anywidget's front-end module in its current form: a function
// that anywidget calls once per widget model, returning { render }. What it keeps
// between calls of render is that model's view memory (focus, scroll, the grid's
// cursor), so a view drawn again for the same model picks up where the last one was.
// modelFromPayload(payload) builds the small model an offline page needs.
import { render } from "./render.js";
import { createMemory } from "./memory.js";

export { modelFromPayload } from "./offline.js";
export { SEQUENTIAL, DIVERGING } from "./scales.js";
export { VERSION } from "./version.js";

export default () => {
  const memory = createMemory();
  return { render: (view) => render(view, memory) };
};
