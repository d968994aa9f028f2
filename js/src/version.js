// The front end's version; tests/test_widgets.py checks that it equals infoscope.__version__.
export const VERSION = "0.1.0";
