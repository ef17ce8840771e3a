"""The worksheet steps (one module each) and the app's dialogs."""
