"""Tolerances and resolutions in one place, each with its unit and why it is what it is."""

#: Points per side (upper, lower) of a section loop fed to the loft. The loop is
#: parameterised by the cosine angle, in which NACA and fitted sections are smooth
#: through the leading edge, so cubic interpolation at this count is far below 1 µm
#: on a 200 mm chord (tested in tests/test_loft.py).
LOFT_POINTS_PER_SIDE = 80
#: How far the chordwise cubic through a loft section's points may stray from the section
#: midway between them, mm, at the part's largest chord; more points a side until it does
#: not (SurfaceModel.loft_points_per_side). A NACA 4-digit mean line jumps in curvature at its
#: camber position, where the cubic converges only as the square of the spacing: a 2412
#: keeps 80 points up to about 1,000 mm of chord and takes about 200 at 4,716 mm, a 9730 at
#: 200 mm about 160; the demo keeps 80 everywhere.
LOFT_CHORDWISE_TOL_MM = 0.02
LOFT_POINTS_PER_SIDE_MAX = 640

#: Loft sections per half span (or per station interval, whichever gives more),
#: spaced densely toward the tip. Between loft sections the skin is a cubic B-spline.
LOFT_SECTIONS = 24

#: Minimum loft sections per station interval (cubic interpolation needs four).
LOFT_SECTIONS_PER_INTERVAL_MIN = 5

#: How far the skin's spanwise cubic through the loft sections may stray from the model's
#: section midway between two of them, mm (checked on loops of LOFT_FOLLOW_POINTS_PER_SIDE
#: points a side); a section is added there until it does not. The demo needs none added;
#: a rounded tip's quarter ellipse does (8 sections strayed 0.8 mm on a 120 mm tip chord and
#: 17.6 mm on a 1,900 mm one; refined: 22 and 36).
LOFT_FOLLOW_TOL_MM = 0.005
LOFT_FOLLOW_POINTS_PER_SIDE = 40
#: Loft sections closer than twice this are not split further, mm.
LOFT_FOLLOW_MIN_GAP_MM = 0.05
#: Most loft sections one crease-free segment gets.
LOFT_SECTIONS_MAX_PER_SEGMENT = 400

#: Chord fraction where the finite-trailing-edge thickening starts (cubic ramp, C2).
TE_RAMP_START = 0.5

#: A trailing edge may be at most this fraction of the local section thickness at the
#: ramp start, else the thickening would reshape the section rather than finish it.
TE_MAX_FRACTION_OF_RAMP_THICKNESS = 0.5

#: Default finished trailing-edge thickness for shop parts, mm (common practice, no
#: source: finished parts carry about 0.5-1.5 mm flat).
TE_THICKNESS_MM = 0.5

#: Thinnest open trailing edge accepted, mm (0 = sharp is always accepted): the kernel cannot
#: make an edge of 1e-7 mm (1e-6 mm built), and no shop can make one of a micrometre.
MIN_TE_THICKNESS_MM = 0.001

#: STL chordal deviation from the B-spline skin, mm (mid-edge distance bound).
STL_LINEAR_TOL_MM = 0.05

#: Relative accuracy asked of OCP's volume/area integrals (explicit; a wrapper's default
#: was seen 17 % low on lofted B-spline solids). At 1e-6 the demo wing's volume differs
#: from the 1e-7 result by 7e-7 relative, four times faster.
GPROP_EPS = 1e-6

#: Smoothing of coordinate-file fits: assumed noise of the file's ordinates, in chord
#: fractions (files usually carry 5-6 decimals).
COORD_NOISE = 5e-5

#: Closest two stations may be, mm (nearly coincident sections make sliver solids).
MIN_STATION_GAP_MM = 0.5

#: Rounded tip: default length beyond the last station, as a fraction of its chord, and
#: the chord fraction left for the small flat end (a B-spline skin cannot close to a point).
ROUND_TIP_LENGTH_OF_CHORD = 0.5
ROUND_TIP_END_CHORD = 0.15

#: Build tolerances of the check pass: how far a measured figure may sit from the intended
#: one before the part is called faulty. STEP: the skin is within 0.005 mm of the intended
#: sections and sliced on a grid within about 0.01 mm of the skin. STL: chordal tolerance.
CHECK_LENGTH_MM = 0.05       # spans, chords, MAC and its position (STEP)
CHECK_RELATIVE = 5e-4        # areas, aspect ratio, taper (STEP), relative
CHECK_VOLUME_REL = 1e-3      # volume and wetted area (STEP), relative
CHECK_ANGLE_DEG = 0.05       # quarter-chord sweep
CHECK_THICKNESS_MM = 0.03    # section thickness at stations (STEP)
#: Section properties at stations (STEP): every point of the written section may sit this far
#: from the intended one (skin within 0.005 mm of the sections, slice within 0.01 mm of the
#: skin), so area may differ by this x perimeter and a second moment by this x perimeter x the
#: squared extreme-fibre distance. The warping J of two polygons with different points differs
#: by the mesh as well: CHECK_TORSION_REL more, relative.
CHECK_SECTION_MM = 0.02
CHECK_TORSION_REL = 0.01

# -- kernel tolerances (the CAD edge, geomgen/cad/) ----------------------------------------------
#: Sewing tolerance of the skin, trailing-edge strip and caps, mm: far below any feature, far
#: above the skin's own closure error (the poles are shared, so edges match to ~1e-9 mm).
KERNEL_SEW_TOL_MM = 1e-4

#: Tolerance given to faces made from B-spline surfaces, mm (the surface is exact; this only
#: sizes the face's own edges).
KERNEL_FACE_TOL_MM = 1e-7

#: Point classifier tolerance (feature probe points inside before a cut, outside after), mm.
KERNEL_CLASSIFIER_TOL_MM = 1e-6

#: Volume bookkeeping of a boolean cut: |V_before - V_after - V_removed| must stay within
#: BOOLEAN_VOLUME_REL x V_before + BOOLEAN_REMOVED_REL x V_removed (the removed volume is a
#: common with curved tools, integrated less exactly than the part).
BOOLEAN_VOLUME_REL = 1e-5
BOOLEAN_REMOVED_REL = 1e-3

#: Shop parts: the pieces, halves or cut part plus what the features removed must add up to
#: the whole part within this fraction of its volume, else nothing is written.
SHOP_VOLUME_BALANCE_REL = 1e-3

#: Kernel meshes of shop parts: edge end nodes closer than this are one vertex, mm; edges
#: shorter than min(this, 5 % of the chordal tolerance) are collapsed (single-precision STL).
MESH_MERGE_TOL_MM = 1e-5
MESH_SHORT_EDGE_MM = 1e-3

#: Seconds a command waits for another geomgen run to finish writing the same output folder
#: before it refuses, naming that run's process (a build takes longer than anyone would wait
#: without a word; two runs into one folder are a mistake to report, not to queue).
LOCK_WAIT_S = 5.0

#: Largest spec file read, bytes. A real spec with every table is a few kB; the cap counts
#: the bytes actually read (a device reports no size), so a wrong path cannot eat memory.
MAX_SPEC_BYTES = 1_000_000

#: Deepest nesting of tables and arrays in a spec (the schema needs about 5 levels).
MAX_SPEC_DEPTH = 12

#: Error lines printed for one refusal; the rest are counted (2 million unknown keys once
#: printed 2 million lines). Fixing the first few usually fixes many of the rest.
MAX_ERROR_LINES = 50

# -- hydrodynamics ---------------------------------------------------------------------------
#: Memory budget of one vortex-lattice solve, bytes (1 GiB): a lattice whose matrices
#: (influence, wash at the force points, Trefftz wash, the solver's copy, free-surface images:
#: LATTICE_MATRICES x N² float64) would exceed it is refused before anything is allocated.
#: The machines this runs on have a few GiB shared between users; 1 GiB is 4,096 panels.
LATTICE_MEMORY_BUDGET_BYTES = 1 << 30
LATTICE_MATRICES = 8
#: The most panels the budget holds (the one number README and messages state).
LATTICE_MAX_PANELS = int((LATTICE_MEMORY_BUDGET_BYTES / (LATTICE_MATRICES * 8)) ** 0.5)

#: A mounting pad flat over less of its footprint than this is warned about: the fuselage
#: then bears on a small patch (common practice, no source).
PAD_CONTACT_WARN = 0.5
