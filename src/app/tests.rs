//! Headless tests of the editor.
