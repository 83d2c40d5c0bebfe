"""The fixed vocabularies and defaults that both the engine and the command line name.

Plain Python with no imports, so that a subcommand's ``--help`` can list its choices
without loading the engine (numpy, pandas, pvlib). The engine modules that own each
concept import it from here and keep it under its usual name
(``tiltyard.engine.plane.TRANSPOSITION_MODELS`` and so on).
"""

#: Sky diffuse (transposition) models, pvlib's names (tiltyard.engine.plane).
TRANSPOSITION_MODELS = ("isotropic", "haydavies", "perez")

#: Clear-sky models, pvlib's names (tiltyard.engine.sky).
CLEARSKY_MODELS = ("ineichen", "simplified_solis", "haurwitz")

#: Mean total solar irradiance at 1 AU, W/m² (Kopp & Lean 2011, GRL 38, L01706;
#: tiltyard.engine.sky).
SOLAR_CONSTANT_W_M2 = 1361.0

#: How panels are held (tiltyard.engine.site).
MOUNTINGS = ("flush", "fixed-rack", "adjustable", "ground-rows", "flat-roof-rows")

#: The reference year, non-leap (tiltyard.engine.timegrid).
REFERENCE_YEAR = 2023

#: Interval lengths offered for resampling a clear or monthly sky, minutes
#: (tiltyard.engine.timegrid).
STEPS_MIN = (60, 30, 15, 10, 5, 1)

#: Time bases of displayed times: local clock time, local standard time, apparent
#: solar time (tiltyard.engine.timegrid).
TIME_BASES = ("clock", "standard", "solar")

#: Kinds of tilt-study option, in the order a study lists them (tiltyard.engine.tilt).
OPTION_KINDS = ("horizontal", "plane", "rule-of-thumb", "fixed-optimal", "two-season",
                "four-season", "monthly", "two-axis")
