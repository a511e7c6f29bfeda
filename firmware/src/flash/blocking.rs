//! sequential-storage is async only; the device's flash driver is blocking. [`Async`]
//! lends a blocking driver the async traits (each call completes at once), and
//! [`block_on`] drives a storage future to its end.
//!
//! A storage future is never dropped half-way: [`block_on`] only returns once the future
//! has finished, so a write sequence is never cancelled between two flash operations
//! (sequential-storage repairs such a cut, but the item may then be lost).

use core::future::Future;
use core::pin::pin;
use core::task::{Context, Poll, Waker};

use embedded_storage::nor_flash::{
    ErrorType, MultiwriteNorFlash, NorFlash as BlockingNorFlash,
    ReadNorFlash as BlockingReadNorFlash,
};
use embedded_storage_async::nor_flash as a;

/// A blocking NOR flash seen through the async traits.
#[derive(Debug)]
pub struct Async<'a, F>(pub &'a mut F);

impl<F: ErrorType> a::ErrorType for Async<'_, F> {
    type Error = F::Error;
}

impl<F: BlockingReadNorFlash> a::ReadNorFlash for Async<'_, F> {
    const READ_SIZE: usize = F::READ_SIZE;
    async fn read(&mut self, offset: u32, bytes: &mut [u8]) -> Result<(), Self::Error> {
        self.0.read(offset, bytes)
    }
    fn capacity(&self) -> usize {
        self.0.capacity()
    }
}

impl<F: BlockingNorFlash> a::NorFlash for Async<'_, F> {
    const WRITE_SIZE: usize = F::WRITE_SIZE;
    const ERASE_SIZE: usize = F::ERASE_SIZE;
    async fn erase(&mut self, from: u32, to: u32) -> Result<(), Self::Error> {
        self.0.erase(from, to)
    }
    async fn write(&mut self, offset: u32, bytes: &[u8]) -> Result<(), Self::Error> {
        self.0.write(offset, bytes)
    }
}

impl<F: MultiwriteNorFlash> a::MultiwriteNorFlash for Async<'_, F> {}

/// Run `fut` to completion on the calling thread.
///
/// The futures given here only wait on [`Async`] flash calls, which are ready at once, so
/// each poll makes progress and the loop ends when the storage operation does.
pub fn block_on<T>(fut: impl Future<Output = T>) -> T {
    let mut fut = pin!(fut);
    let mut cx = Context::from_waker(Waker::noop());
    loop {
        if let Poll::Ready(v) = fut.as_mut().poll(&mut cx) {
            return v;
        }
    }
}
