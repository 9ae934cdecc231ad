//! Inputs that once gave a wrong answer or a crash, one file each; the doc comment of each file
//! says what broke.

mod subnormal_capacity;
