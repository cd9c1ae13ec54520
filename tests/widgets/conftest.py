"""Widget tests run without a display: matplotlib on its file-only backend."""

import matplotlib

matplotlib.use("Agg")
