//! Every source the report cites, in one list. Keys are what the templates write in the text.
//! Citations recalled rather than re-read are marked "(from memory)".

/// (key, full citation), in alphabetical order of key.
pub const REFERENCES: [(&str, &str); 20] = [
    (
        "Berdahl & Martin 1984",
        "Berdahl, P., Martin, M. (1984). Emissivity of clear skies. Solar Energy 32(5), 663–664 \
         (from memory).",
    ),
    (
        "Collares-Pereira & Rabl 1979",
        "Collares-Pereira, M., Rabl, A. (1979). The average distribution of solar radiation — \
         correlations between diffuse and hemispherical and between daily and hourly insolation \
         values. Solar Energy 22, 155–164 (from memory).",
    ),
    (
        "Duffie & Beckman 2013",
        "Duffie, J.A., Beckman, W.A. (2013). Solar Engineering of Thermal Processes, 4th ed. \
         Wiley. Ch. 1 (sun), ch. 2 (Erbs, Klein's days), ch. 5 (cover optics: Fresnel \
         reflection, Bouguer absorption) (from memory).",
    ),
    (
        "Dunkle 1961",
        "Dunkle, R.V. (1961). Solar water distillation: the roof type still and a multiple \
         effect diffusion still. International Developments in Heat Transfer, ASME, Part V, \
         895–902 (from memory).",
    ),
    (
        "Erbs et al. 1982",
        "Erbs, D.G., Klein, S.A., Duffie, J.A. (1982). Estimation of the diffuse radiation \
         fraction for hourly, daily and monthly-average global radiation. Solar Energy 28(4), \
         293–302 (from memory).",
    ),
    (
        "Hay & Davies 1980",
        "Hay, J.E., Davies, J.A. (1980). Calculation of the solar radiation incident on an \
         inclined surface. Proc. First Canadian Solar Radiation Data Workshop, 59–72 \
         (from memory).",
    ),
    (
        "Hollands et al. 1976",
        "Hollands, K.G.T., Unny, T.E., Raithby, G.D., Konicek, L. (1976). Free convective heat \
         transfer across inclined air layers. J. Heat Transfer 98(2), 189–193 (from memory).",
    ),
    (
        "IAPWS-IF97",
        "IAPWS (2007). Revised Release on the IAPWS Industrial Formulation 1997 for the \
         Thermodynamic Properties of Water and Steam (region 4, saturation line).",
    ),
    (
        "Klein 1977",
        "Klein, S.A. (1977). Calculation of monthly average insolation on tilted surfaces. \
         Solar Energy 19, 325–329 (from memory).",
    ),
    (
        "Kozisek 2009",
        "Kozisek, F. (2009). Regulations for calcium, magnesium or hardness in drinking water \
         in the European Union member states. In: WHO, Calcium and Magnesium in \
         Drinking-water: Public Health Significance, Geneva (from memory).",
    ),
    (
        "Kumar & Tiwari 1996",
        "Kumar, S., Tiwari, G.N. (1996). Estimation of convective mass transfer in solar \
         distillation systems. Solar Energy 57(6), 459–464 (from memory).",
    ),
    (
        "Marrero & Mason 1972",
        "Marrero, T.R., Mason, E.A. (1972). Gaseous diffusion coefficients. J. Phys. Chem. \
         Ref. Data 1(1), 3–118 (from memory).",
    ),
    (
        "Nayar et al. 2016",
        "Nayar, K.G., Sharqawy, M.H., Banchik, L.D., Lienhard, J.H. (2016). Thermophysical \
         properties of seawater: a review and new correlations that include pressure \
         dependence. Desalination 390, 1–24.",
    ),
    (
        "Rabl & Nielsen 1975",
        "Rabl, A., Nielsen, C.E. (1975). Solar ponds for space heating. Solar Energy 17, 1–12 \
         (from memory).",
    ),
    (
        "Sharqawy et al. 2010",
        "Sharqawy, M.H., Lienhard, J.H., Zubair, S.M. (2010). Thermophysical properties of \
         seawater: a review of existing correlations and data. Desalination and Water \
         Treatment 16, 354–380.",
    ),
    (
        "Sphere 2018",
        "Sphere Association (2018). The Sphere Handbook: Humanitarian Charter and Minimum \
         Standards in Humanitarian Response, 4th ed., Geneva. Water supply standard 2.1 \
         (from memory).",
    ),
    (
        "Swinbank 1963",
        "Swinbank, W.C. (1963). Long-wave radiation from clear skies. Quarterly Journal of the \
         Royal Meteorological Society 89, 339–348 (from memory).",
    ),
    (
        "WHO 2011 desalination",
        "WHO (2011). Safe Drinking-water from Desalination. WHO/HSE/WSH/11.03, Geneva \
         (from memory).",
    ),
    (
        "WHO 2017 GDWQ",
        "WHO (2017). Guidelines for Drinking-water Quality, 4th ed. incorporating the first \
         addendum, Geneva: water safety plans, verification monitoring (from memory).",
    ),
    (
        "Watmuff et al. 1977",
        "Watmuff, J.H., Charters, W.W.S., Proctor, D. (1977). Solar and wind induced external \
         coefficients for solar collectors. COMPLES 2, 56 (from memory).",
    ),
];
