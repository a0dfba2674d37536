//! Safety cautions every user-facing result carries: the tool estimates water quantity, never
//! water safety, and a still has glass, hot surfaces and a structure.

/// Short cautions printed under every text result (reports carry the long form).
///
/// Sources: WHO, *Safe drinking-water from desalination* (WHO/HSE/WSH/11.03, 2011) on
/// remineralisation and carry-over of volatile compounds, and WHO, *Guidelines for
/// drinking-water quality*, 4th ed. (2017), on water-safety plans and verification testing
/// (both from memory, not re-checked against the text).
pub const CAUTIONS: [&str; 5] = [
    "Drinking water: these figures are quantities, not a safety certificate. Test the feed \
     water before building and the distillate at commissioning and routinely, under a \
     water-safety plan; follow your local health authority and use an accredited laboratory.",
    "Distillate is very soft and slightly acidic: remineralise it before drinking, and store it \
     covered in clean, lidded, food-grade containers (no copper, lead or galvanised ones).",
    "Still temperatures do not guarantee disinfection, and volatile contaminants (fuel, \
     solvents, ammonia) carry over into the distillate: never feed contaminated water.",
    "Glass and hot surfaces: wear gloves and eye protection when cutting and fitting glass; \
     covers, trays and brine can exceed 70 °C in sun.",
    "Structures: check supports, wind loads and roof or ground loading against local building \
     codes and licensed practice.",
];

/// Write the cautions as a short block of text.
pub fn write_cautions(w: &mut (impl std::io::Write + ?Sized)) -> std::io::Result<()> {
    writeln!(w)?;
    writeln!(w, "Cautions:")?;
    for c in CAUTIONS {
        writeln!(w, "  - {c}")?;
    }
    Ok(())
}

/// Calcium to reach when remineralising distillate for drinking [mg L⁻¹]: the lower bound
/// of the minimum recommended by Kozisek in WHO, *Calcium and magnesium in drinking-water:
/// public health significance* (2009), 20–30 mg/L (from memory, not re-checked).
pub const REMINERALISED_CALCIUM_MIN_MG_L: f64 = 20.0;

/// Magnesium to reach when remineralising distillate for drinking [mg L⁻¹]: the minimum of
/// 10 mg/L in the same source as [`REMINERALISED_CALCIUM_MIN_MG_L`] (from memory).
pub const REMINERALISED_MAGNESIUM_MIN_MG_L: f64 = 10.0;

/// The long-form cautions every report carries, as (heading, text). Sources as for
/// [`CAUTIONS`], plus the remineralisation figures above.
pub const REPORT_CAUTIONS: [(&str, &str); 7] = [
    (
        "Remineralise before drinking",
        "Distillate is almost free of minerals and slightly acidic, so it can leach metals from \
         pipes and containers and lacks the calcium and magnesium drinking water normally \
         supplies. Remineralise it before drinking (for example by contact with limestone or \
         dolomite, or by blending with a safe mineral-bearing water), following WHO guidance on \
         drinking-water from desalination (WHO 2011 desalination).",
    ),
    (
        "Not automatically safe to drink",
        "Still temperatures are not a reliable disinfection step, and the distillate can be \
         recontaminated after it leaves the cover. Keep the collection trough covered and the \
         outlet closed, store the water in clean lidded food-grade containers, and never use \
         copper, lead or galvanised containers or fittings.",
    ),
    (
        "Volatile contaminants carry over",
        "Compounds that evaporate with water (fuel, solvents, ammonia and some pesticides) pass \
         into the distillate. Do not feed water that may be contaminated with fuel or \
         chemicals.",
    ),
    (
        "Test under a water-safety plan",
        "Test the feed water before building, and the distillate at commissioning and \
         routinely afterwards, under a water-safety-plan approach (WHO 2017 GDWQ). Defer to \
         the local health authority, and use an accredited laboratory for the results that \
         decide whether the water is drunk.",
    ),
    (
        "Glass handling",
        "Cut, carry and fit glass with gloves and eye protection; keep offcuts away from \
         children and dispose of them safely.",
    ),
    (
        "Hot surfaces",
        "Covers, absorbers, trays and brine can exceed 70 °C in sun; open and clean stills \
         early in the morning.",
    ),
    (
        "Structures and local codes",
        "Check supports, foundations, wind loads and any roof loading against local building \
         codes and licensed practice before installing an array.",
    ),
];
