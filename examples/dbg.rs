fn main() {
    let x = 63.19533920288086f32;
    let a = 168.0f32;
    let b32 = countward::math::loader::bd0(a, x) as f64;
    let b64 = countward::math::loader::bd0(a as f64, x as f64);
    println!("bd0 f32 {b32} f64 {b64} diff {:e}", b32 - b64);
    let s32 = countward::math::loader::stirlerr(a) as f64;
    let s64 = countward::math::loader::stirlerr(a as f64);
    println!("stirlerr diff {:e}", s32 - s64);
    println!(
        "{:?} {:?}",
        countward::math::ln_gamma_p(a, x),
        countward::math::ln_gamma_p(a as f64, x as f64)
    );
}
