"""Unit conversions used across the package (their one home)."""

import math

#: arcseconds per radian, 180 x 3600 / pi = 206264.806...
ARCSEC_PER_RAD = 180.0 * 3600.0 / math.pi
