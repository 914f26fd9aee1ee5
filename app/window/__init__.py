"""The pieces of the main window (``app.main_window.MainWindow``): the verdict banner, the file actions
(open, save, recent files, exports) and the autosave of unsaved work."""
