//! tmp
pub mod error;
pub mod summary;
pub mod quantile;
pub mod interval;
pub mod boxplot;
pub mod steps;
pub mod histogram;
pub mod random;
pub mod jitter;
pub mod bootstrap;
pub mod regression;
