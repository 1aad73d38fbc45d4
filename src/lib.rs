//! calcisite: screening-level carbonate chemistry and aragonite-saturation outlooks for
//! candidate coral-reef restoration sites (see `DEVELOPERS.md` for the module map).

pub mod chem;
pub mod cli;
pub mod fsio;
