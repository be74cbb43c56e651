//! The input language: tokens, expressions, statements, model files.
