"""joulebook's faces: the command line (``tui.cli``) and the Textual app.

Importing this package imports neither Textual nor CoolProp."""
