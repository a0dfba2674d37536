//! The materials library: what a local market sells, at what price, with the physical
//! properties the model needs for each role.

use serde::{Deserialize, Serialize};

/// A materials library file.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Library {
    /// `[library]`.
    pub library: LibraryHeader,
    /// `[[item]]` in file order.
    #[serde(default, rename = "item")]
    pub items: Vec<Item>,
}

/// `[library]`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LibraryHeader {
    /// Name of the library (e.g. the market it describes).
    pub name: String,
    /// Currency of every price, three upper-case letters.
    pub currency: String,
}

/// What an item is used for. A design field that takes a material id accepts only items of
/// the roles it names.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Role {
    /// Transparent cover or glazing.
    Cover,
    /// Basin liner sheet.
    Liner,
    /// Thermal insulation.
    Insulation,
    /// Wick cloth.
    Wick,
    /// Stage plate of a multi-effect still.
    Plate,
    /// Sealant.
    Sealant,
    /// Frame or structure.
    Structure,
    /// Fittings (pipes, valves, troughs).
    Fitting,
    /// Containers (tanks, jerrycans).
    Container,
    /// Paint or coating.
    Paint,
}

/// All roles with their names, for messages.
pub const ROLE_NAMES: [&str; 10] = [
    "cover",
    "liner",
    "insulation",
    "wick",
    "plate",
    "sealant",
    "structure",
    "fitting",
    "container",
    "paint",
];

impl Role {
    /// The role's name as written in a library file.
    pub fn name(self) -> &'static str {
        match self {
            Role::Cover => "cover",
            Role::Liner => "liner",
            Role::Insulation => "insulation",
            Role::Wick => "wick",
            Role::Plate => "plate",
            Role::Sealant => "sealant",
            Role::Structure => "structure",
            Role::Fitting => "fitting",
            Role::Container => "container",
            Role::Paint => "paint",
        }
    }
}

/// The unit an item is priced in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub enum Unit {
    /// Square metre.
    #[serde(rename = "m2")]
    SquareMetre,
    /// Metre.
    #[serde(rename = "m")]
    Metre,
    /// Kilogram.
    #[serde(rename = "kg")]
    Kilogram,
    /// Litre.
    #[serde(rename = "L")]
    Litre,
    /// One piece.
    #[serde(rename = "piece")]
    Piece,
}

/// One stock size: a sheet (`width_m` and `length_m`) or a bar or roll (`length_m` only).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Stock {
    /// Sheet width [m], (0, 100]; absent for bars.
    #[serde(default)]
    pub width_m: Option<f64>,
    /// Length [m], (0, 1000].
    pub length_m: f64,
    /// Board or sheet thickness [mm], (0, 500]; lets an item priced per m² supply a volume
    /// (insulation board). Optional.
    #[serde(default)]
    pub thickness_mm: Option<f64>,
    /// Sold off a roll by the metre (film, cloth, liner): only the length used is bought.
    /// Default false (whole sheets or bars are bought).
    #[serde(default)]
    pub roll: bool,
}

/// One item on sale.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Item {
    /// Unique kebab-case id, used by designs.
    pub id: String,
    /// Human-readable name.
    pub name: String,
    /// What it is used for.
    pub role: Role,
    /// Pricing unit.
    pub unit: Unit,
    /// Price per unit in the library's currency, [0, 1e7].
    pub unit_price: f64,
    /// Service life [years], (0, 100].
    pub lifetime_years: f64,
    /// Whether it can be bought locally.
    pub local: bool,
    /// Days from order to delivery, [0, 1000].
    #[serde(default)]
    pub lead_time_days: Option<f64>,
    /// Extra cost per unit when imported, [0, 1e7].
    #[serde(default)]
    pub import_cost: Option<f64>,
    /// Sizes it is sold in.
    #[serde(default)]
    pub stock: Vec<Stock>,
    /// Safe in contact with drinking water; default false.
    #[serde(default)]
    pub food_grade: bool,
    /// Skills needed to work the item (e.g. `glass cutting`, `carpentry`). Optional.
    #[serde(default)]
    pub skills: Vec<String>,
    /// Tools needed to work the item (e.g. `glass cutter`, `saw`). Optional.
    #[serde(default)]
    pub tools: Vec<String>,
    /// Volume of one piece [L], (0, 1000] (e.g. a sealant cartridge). Optional.
    #[serde(default)]
    pub content_l: Option<f64>,
    /// Area one litre covers in one coat [m² L⁻¹], (0, 1000] (paint). Optional.
    #[serde(default)]
    pub coverage_m2_l: Option<f64>,
    /// Why the item must not touch vapour or distillate, when it must not (shown with the
    /// food-safety flag). Optional.
    #[serde(default)]
    pub taint: Option<String>,
    /// `[item.cover]`, required for role `cover`.
    #[serde(default)]
    pub cover: Option<CoverProps>,
    /// `[item.liner]`, required for role `liner`.
    #[serde(default)]
    pub liner: Option<SurfaceProps>,
    /// `[item.paint]`, required for role `paint`.
    #[serde(default)]
    pub paint: Option<SurfaceProps>,
    /// `[item.insulation]`, required for role `insulation`.
    #[serde(default)]
    pub insulation: Option<InsulationProps>,
    /// `[item.wick]`, required for role `wick`.
    #[serde(default)]
    pub wick: Option<WickProps>,
    /// `[item.plate]`, required for role `plate`.
    #[serde(default)]
    pub plate: Option<PlateProps>,
}

/// The property sub-tables an item may carry, and the role each belongs to.
pub(crate) const PROPERTY_TABLES: [(&str, Role); 6] = [
    ("cover", Role::Cover),
    ("liner", Role::Liner),
    ("paint", Role::Paint),
    ("insulation", Role::Insulation),
    ("wick", Role::Wick),
    ("plate", Role::Plate),
];

impl Item {
    /// Whether the item has the property sub-table named `table`.
    pub(crate) fn has_table(&self, table: &str) -> bool {
        match table {
            "cover" => self.cover.is_some(),
            "liner" => self.liner.is_some(),
            "paint" => self.paint.is_some(),
            "insulation" => self.insulation.is_some(),
            "wick" => self.wick.is_some(),
            "plate" => self.plate.is_some(),
            _ => false,
        }
    }

    /// The absorbing-surface properties of a liner or paint item.
    pub fn surface(&self) -> Option<&SurfaceProps> {
        self.liner.as_ref().or(self.paint.as_ref())
    }
}

/// How condensate forms on a cover.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Condensate {
    /// A continuous film (wettable surfaces such as clean glass).
    Film,
    /// Drops (most plastics), which reflect and scatter more light.
    Drops,
}

/// `[item.cover]`.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CoverProps {
    /// Refractive index [-], [1, 3].
    pub refractive_index: f64,
    /// Extinction coefficient [m⁻¹], [0, 1e4].
    pub extinction_per_m: f64,
    /// Thickness [mm], (0, 50].
    pub thickness_mm: f64,
    /// Long-wave emissivity [-], [0, 1].
    pub emissivity: f64,
    /// Thermal conductivity [W m⁻¹ K⁻¹], (0, 500].
    pub conductivity_w_m_k: f64,
    /// Film or drops.
    pub condensate: Condensate,
}

/// `[item.liner]` or `[item.paint]`: an absorbing surface.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SurfaceProps {
    /// Solar absorptance [-], [0, 1].
    pub absorptance: f64,
    /// Long-wave emissivity [-], [0, 1].
    pub emissivity: f64,
    /// Thickness [mm], (0, 50]; optional.
    #[serde(default)]
    pub thickness_mm: Option<f64>,
    /// Thermal conductivity [W m⁻¹ K⁻¹], (0, 500]; optional.
    #[serde(default)]
    pub conductivity_w_m_k: Option<f64>,
}

/// `[item.insulation]`.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct InsulationProps {
    /// Thermal conductivity [W m⁻¹ K⁻¹], (0, 5].
    pub conductivity_w_m_k: f64,
    /// Density [kg m⁻³], (0, 5000].
    pub density_kg_m3: f64,
}

/// `[item.wick]`.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct WickProps {
    /// Solar absorptance when wet [-], [0, 1].
    pub absorptance: f64,
    /// Long-wave emissivity [-], [0, 1].
    pub emissivity: f64,
    /// Thickness [mm], (0, 20].
    pub thickness_mm: f64,
    /// Water held when saturated [kg m⁻²], (0, 20].
    pub water_holding_kg_m2: f64,
}

/// `[item.plate]`.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PlateProps {
    /// Thermal conductivity [W m⁻¹ K⁻¹], (0, 500].
    pub conductivity_w_m_k: f64,
    /// Thickness [mm], (0, 20].
    pub thickness_mm: f64,
    /// Long-wave emissivity [-], [0, 1].
    pub emissivity: f64,
}

impl Library {
    /// The item with id `id`.
    pub fn get(&self, id: &str) -> Option<&Item> {
        self.items.iter().find(|i| i.id == id)
    }

    /// How many items are sold locally.
    pub fn local_count(&self) -> usize {
        self.items.iter().filter(|i| i.local).count()
    }
}
