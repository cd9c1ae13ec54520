"""End-to-end test in a real browser: JupyterLab served locally, driven by Playwright."""
