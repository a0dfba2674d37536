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
