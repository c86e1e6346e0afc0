//! The physical ranges of the numbers a schedule, design or machine file may
//! hold, in one place: both `schedule::validate` and `machine` check against
//! these. They bound what is physical (or keep typing errors out); they are
//! not defaults. Sources in docs/physics.md, "Physical ranges of inputs".

/// Physical range of a metal's density, kg/m^3: lithium 534 to osmium 22,590
/// (CRC Handbook of Chemistry and Physics, from memory), widened to round
/// figures. Outside it a figure such as the temperature rise overflows.
pub const DENSITY_RANGE_KG_M3: (f64, f64) = (100.0, 30_000.0);
/// Physical range of a metal's specific heat near room temperature,
/// J/(kg K): about 116 (uranium) to 3,580 (lithium) (CRC Handbook, from
/// memory), widened to round figures.
pub const SPECIFIC_HEAT_RANGE_J_KG_K: (f64, f64) = (50.0, 5_000.0);
/// Range of a diameter in a file, mm: from 1 um (below the finest drawn
/// wire, about 10 um) to 1 m (above any drawn bar); common practice.
pub const DIAMETER_RANGE_MM: (f64, f64) = (0.001, 1000.0);
/// Largest accumulated true strain in a file (`start.strain`,
/// `cold_work_limit`): 20 is an area ratio of e^20, about 5e8, beyond any
/// drawing sequence (rod to the finest wire is about 12).
pub const STRAIN_MAX: f64 = 20.0;
/// Range of the ambient (die-entry) temperature, deg C: a mill floor from
/// -50 C to 100 C (common practice).
pub const AMBIENT_RANGE_C: (f64, f64) = (-50.0, 100.0);
/// Highest wire-temperature limit, deg C (schedule and machine): above the
/// melting point of the drawn metals this is no limit (copper melts at
/// 1,085 C); from memory.
pub const WIRE_TEMPERATURE_MAX_C: f64 = 2000.0;
/// Fastest wire or capstan surface speed, m/s (a schedule's finish speed, a
/// block's highest surface speed, the machine's cooling speed): the fastest
/// fine-wire lines run at tens of m/s (common practice); 500 leaves wide room.
pub const SPEED_MAX_M_S: f64 = 500.0;
/// Largest power of one block, kW (a schedule's `line.block_power_kw`, a
/// machine's `motor_kw`): drawing blocks are a few to a few hundred kW
/// (common practice); the bound only keeps typing errors out.
pub const POWER_MAX_KW: f64 = 100_000.0;
/// Largest capstan diameter, mm: bull blocks run to about 1.5 m (common
/// practice); the bound only keeps typing errors out.
pub const CAPSTAN_DIAMETER_MAX_MM: f64 = 5000.0;
/// Largest capstan speed, rpm.
pub const CAPSTAN_RPM_MAX: f64 = 100_000.0;
/// Heaviest coil or spool, kg (common practice: rod coils are a few tonnes).
pub const COIL_MASS_MAX_KG: f64 = 1_000_000.0;
/// Longest shift, hours.
pub const SHIFT_HOURS_MAX: f64 = 24.0;
/// Semi-angle of a drawing die, degrees: open range (0, 45); common practice
/// dies are 2 to 15.
pub const SEMI_ANGLE_RANGE_DEG: (f64, f64) = (0.0, 45.0);
/// Largest die-room size step, mm.
pub const DIE_STEP_MAX_MM: f64 = 10.0;
/// Range of a slip machine's cone step ratio (open): above 1 (each capstan
/// faster than the one before) and below 10.
pub const STEP_RATIO_RANGE: (f64, f64) = (1.0, 10.0);
